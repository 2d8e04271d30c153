CREATE TABLE "line_fits" (
	"spectrum_id" bigint NOT NULL,
	"revision" integer NOT NULL,
	"project_id" uuid NOT NULL,
	"settings" jsonb NOT NULL,
	"result" jsonb NOT NULL,
	"chi2" double precision,
	"dof" integer,
	"detections" smallint DEFAULT 0 NOT NULL,
	"flags" text[] DEFAULT '{}'::text[] NOT NULL,
	"method_version" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "line_fits_spectrum_id_revision_pk" PRIMARY KEY("spectrum_id","revision")
);
--> statement-breakpoint
CREATE TABLE "spectra" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"project_id" uuid NOT NULL,
	"galaxy_id" text NOT NULL,
	"upload_id" uuid NOT NULL,
	"file_name" text NOT NULL,
	"source" text NOT NULL,
	"redshift" double precision NOT NULL,
	"wavelength_medium" text NOT NULL,
	"flux_unit" double precision DEFAULT 1 NOT NULL,
	"resolution" jsonb,
	"pixels" integer NOT NULL,
	"wavelength_min" double precision NOT NULL,
	"wavelength_max" double precision NOT NULL,
	"wavelength" "bytea" NOT NULL,
	"flux" "bytea" NOT NULL,
	"noise_kind" text NOT NULL,
	"noise" "bytea" NOT NULL,
	"sha256" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "spectrum_uploads" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"project_id" uuid NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"file_count" integer NOT NULL,
	"spectrum_count" integer NOT NULL,
	"intake_id" uuid,
	"report" jsonb NOT NULL
);
--> statement-breakpoint
ALTER TABLE "galaxies" ADD COLUMN "provenance" jsonb;--> statement-breakpoint
ALTER TABLE "galaxy_versions" ADD COLUMN "provenance" jsonb;--> statement-breakpoint
ALTER TABLE "line_fits" ADD CONSTRAINT "line_fits_spectrum_id_spectra_id_fk" FOREIGN KEY ("spectrum_id") REFERENCES "public"."spectra"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "line_fits" ADD CONSTRAINT "line_fits_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spectra" ADD CONSTRAINT "spectra_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spectra" ADD CONSTRAINT "spectra_upload_id_spectrum_uploads_id_fk" FOREIGN KEY ("upload_id") REFERENCES "public"."spectrum_uploads"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spectrum_uploads" ADD CONSTRAINT "spectrum_uploads_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spectrum_uploads" ADD CONSTRAINT "spectrum_uploads_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spectrum_uploads" ADD CONSTRAINT "spectrum_uploads_intake_id_intakes_id_fk" FOREIGN KEY ("intake_id") REFERENCES "public"."intakes"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "line_fits_project_revision" ON "line_fits" USING btree ("project_id","revision");--> statement-breakpoint
CREATE UNIQUE INDEX "spectra_project_galaxy" ON "spectra" USING btree ("project_id","galaxy_id");--> statement-breakpoint
CREATE INDEX "spectra_upload" ON "spectra" USING btree ("upload_id","id");--> statement-breakpoint
CREATE INDEX "spectrum_uploads_project_time" ON "spectrum_uploads" USING btree ("project_id","created_at");