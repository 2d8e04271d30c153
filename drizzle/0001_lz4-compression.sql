-- lz4 compresses the large result and input documents several times faster than the default pglz
ALTER TABLE "results" ALTER COLUMN "result" SET COMPRESSION lz4;--> statement-breakpoint
ALTER TABLE "galaxies" ALTER COLUMN "input" SET COMPRESSION lz4;
