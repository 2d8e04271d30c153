-- Float arrays hardly compress (pglz gains a few per cent at a cost of milliseconds per spectrum on
-- upload and read): stored out of line without compression. The fit results compress well: lz4.
ALTER TABLE "spectra" ALTER COLUMN "wavelength" SET STORAGE EXTERNAL;--> statement-breakpoint
ALTER TABLE "spectra" ALTER COLUMN "flux" SET STORAGE EXTERNAL;--> statement-breakpoint
ALTER TABLE "spectra" ALTER COLUMN "noise" SET STORAGE EXTERNAL;--> statement-breakpoint
ALTER TABLE "line_fits" ALTER COLUMN "result" SET COMPRESSION lz4;
