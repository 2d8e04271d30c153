CREATE TABLE "galaxy_versions" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"galaxy_id" bigint NOT NULL,
	"intake_id" uuid NOT NULL,
	"previous_intake_id" uuid,
	"redshift" double precision,
	"ra" double precision,
	"dec" double precision,
	"flux_unit" double precision NOT NULL,
	"input" json NOT NULL,
	"written_at" timestamp with time zone NOT NULL,
	"replaced_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "galaxy_intakes" ADD COLUMN "change" text;--> statement-breakpoint
ALTER TABLE "jobs" ADD COLUMN "params" jsonb;--> statement-breakpoint
ALTER TABLE "jobs" ADD COLUMN "last_id" bigint DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE "jobs" ADD COLUMN "heartbeat_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "jobs" ADD COLUMN "resumed_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "jobs" ADD COLUMN "resume_count" integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE "jobs" ADD COLUMN "resumed_from" integer;--> statement-breakpoint
ALTER TABLE "galaxy_versions" ADD CONSTRAINT "galaxy_versions_galaxy_id_galaxies_id_fk" FOREIGN KEY ("galaxy_id") REFERENCES "public"."galaxies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "galaxy_versions" ADD CONSTRAINT "galaxy_versions_intake_id_intakes_id_fk" FOREIGN KEY ("intake_id") REFERENCES "public"."intakes"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "galaxy_versions_galaxy" ON "galaxy_versions" USING btree ("galaxy_id");--> statement-breakpoint
CREATE INDEX "galaxy_versions_intake" ON "galaxy_versions" USING btree ("intake_id","galaxy_id");--> statement-breakpoint
CREATE INDEX "galaxy_intakes_intake" ON "galaxy_intakes" USING btree ("intake_id","galaxy_id");--> statement-breakpoint
CREATE INDEX "jobs_unfinished" ON "jobs" USING btree ("status") WHERE status in ('queued', 'running');--> statement-breakpoint
-- as for galaxies.input (0001): earlier records are written in bulk and read whole
ALTER TABLE "galaxy_versions" ALTER COLUMN "input" SET COMPRESSION lz4;
