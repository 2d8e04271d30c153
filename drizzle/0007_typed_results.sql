CREATE TABLE "result_layouts" (
	"id" "smallserial" PRIMARY KEY NOT NULL,
	"fingerprint" text NOT NULL,
	"spec" jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "result_layouts_fingerprint_unique" UNIQUE("fingerprint")
);
--> statement-breakpoint
ALTER TABLE "results" ALTER COLUMN "result" DROP NOT NULL;--> statement-breakpoint
ALTER TABLE "results" ADD COLUMN "layout" smallint;--> statement-breakpoint
ALTER TABLE "results" ADD COLUMN "measures" real[];--> statement-breakpoint
ALTER TABLE "results" ADD COLUMN "measures_exact" double precision[];--> statement-breakpoint
ALTER TABLE "results" ADD COLUMN "codes" "bytea";--> statement-breakpoint
ALTER TABLE "results" ADD COLUMN "mc_percentiles" real[];--> statement-breakpoint
ALTER TABLE "results" ADD COLUMN "mc_classes" real[];