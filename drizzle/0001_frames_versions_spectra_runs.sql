CREATE TABLE "frames" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"instrument_id" uuid NOT NULL,
	"sha256" text NOT NULL,
	"size_bytes" integer NOT NULL,
	"original_name" text NOT NULL,
	"format" text NOT NULL,
	"page" integer NOT NULL,
	"page_count" integer NOT NULL,
	"width" integer NOT NULL,
	"height" integer NOT NULL,
	"sample_format" text NOT NULL,
	"bits_per_sample" integer NOT NULL,
	"kind" text DEFAULT 'signal' NOT NULL,
	"taken_at" timestamp with time zone NOT NULL,
	"taken_at_source" text NOT NULL,
	"exposure_s" double precision,
	"accumulations" integer,
	"target" text,
	"pressure_mbar" double precision,
	"filters" text[] DEFAULT '{}'::text[] NOT NULL,
	"driver_nm" double precision,
	"parity" text,
	"scan_variable" text,
	"scan_value" double precision,
	"tags" text[] DEFAULT '{}'::text[] NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"regions" jsonb,
	"uploaded_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "frames_instrument_sha_page_unique" UNIQUE("instrument_id","sha256","page")
);
--> statement-breakpoint
CREATE TABLE "workbench_runs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"instrument_id" uuid NOT NULL,
	"created_by" uuid,
	"status" text NOT NULL,
	"inputs" jsonb NOT NULL,
	"result" jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "calibration_versions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"instrument_id" uuid NOT NULL,
	"number" integer NOT NULL,
	"state" text DEFAULT 'draft' NOT NULL,
	"valid_from" timestamp with time zone NOT NULL,
	"valid_until" timestamp with time zone,
	"note" text DEFAULT '' NOT NULL,
	"author_id" uuid,
	"reviewer_id" uuid,
	"approved_at" timestamp with time zone,
	"superseded_by_id" uuid,
	"superseded_at" timestamp with time zone,
	"run_id" uuid NOT NULL,
	"frame_ids" uuid[] NOT NULL,
	"model" text NOT NULL,
	"driver_nm" double precision NOT NULL,
	"rms_residual_px" double precision NOT NULL,
	"peak_count" integer NOT NULL,
	"calibration" jsonb NOT NULL,
	"history" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "calibration_versions_instrument_number_unique" UNIQUE("instrument_id","number")
);
--> statement-breakpoint
CREATE TABLE "spectra" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"instrument_id" uuid NOT NULL,
	"frame_id" uuid NOT NULL,
	"version_id" uuid NOT NULL,
	"version_number" integer NOT NULL,
	"result" jsonb NOT NULL,
	"regions" jsonb,
	"regions_source" text NOT NULL,
	"drift_shift_px" double precision,
	"drift_shift_px_sigma" double precision,
	"drift_shift_mev" double precision,
	"drift_shift_mev_sigma" double precision,
	"drift_matched_peaks" integer DEFAULT 0 NOT NULL,
	"drift_flagged" boolean DEFAULT false NOT NULL,
	"stale" boolean DEFAULT false NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "spectra_frame_version_unique" UNIQUE("frame_id","version_id")
);
--> statement-breakpoint
CREATE TABLE "run_items" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"run_id" uuid NOT NULL,
	"frame_id" uuid NOT NULL,
	"state" text DEFAULT 'queued' NOT NULL,
	"message" text,
	"job_id" uuid,
	"worker_id" text,
	"attempts" integer DEFAULT 0 NOT NULL,
	"spectrum_id" uuid,
	"version_number" integer,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "run_items_run_frame_unique" UNIQUE("run_id","frame_id")
);
--> statement-breakpoint
CREATE TABLE "runs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"instrument_id" uuid NOT NULL,
	"kind" text NOT NULL,
	"state" text DEFAULT 'queued' NOT NULL,
	"version_number" integer,
	"scan_variable" text,
	"period" jsonb,
	"created_by" uuid NOT NULL,
	"finished_at" timestamp with time zone,
	"notified_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "drift_episodes" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"instrument_id" uuid NOT NULL,
	"first_spectrum_id" uuid NOT NULL,
	"first_frame_id" uuid NOT NULL,
	"opened_at" timestamp with time zone DEFAULT now() NOT NULL,
	"closed_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "instruments" ADD COLUMN "regions" jsonb;--> statement-breakpoint
ALTER TABLE "frames" ADD CONSTRAINT "frames_instrument_id_instruments_id_fk" FOREIGN KEY ("instrument_id") REFERENCES "public"."instruments"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "frames" ADD CONSTRAINT "frames_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "workbench_runs" ADD CONSTRAINT "workbench_runs_instrument_id_instruments_id_fk" FOREIGN KEY ("instrument_id") REFERENCES "public"."instruments"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "workbench_runs" ADD CONSTRAINT "workbench_runs_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "calibration_versions" ADD CONSTRAINT "calibration_versions_instrument_id_instruments_id_fk" FOREIGN KEY ("instrument_id") REFERENCES "public"."instruments"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "calibration_versions" ADD CONSTRAINT "calibration_versions_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "calibration_versions" ADD CONSTRAINT "calibration_versions_reviewer_id_users_id_fk" FOREIGN KEY ("reviewer_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "calibration_versions" ADD CONSTRAINT "calibration_versions_run_id_workbench_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."workbench_runs"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spectra" ADD CONSTRAINT "spectra_instrument_id_instruments_id_fk" FOREIGN KEY ("instrument_id") REFERENCES "public"."instruments"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spectra" ADD CONSTRAINT "spectra_frame_id_frames_id_fk" FOREIGN KEY ("frame_id") REFERENCES "public"."frames"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spectra" ADD CONSTRAINT "spectra_version_id_calibration_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."calibration_versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spectra" ADD CONSTRAINT "spectra_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_items" ADD CONSTRAINT "run_items_run_id_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."runs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_items" ADD CONSTRAINT "run_items_frame_id_frames_id_fk" FOREIGN KEY ("frame_id") REFERENCES "public"."frames"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_instrument_id_instruments_id_fk" FOREIGN KEY ("instrument_id") REFERENCES "public"."instruments"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "drift_episodes" ADD CONSTRAINT "drift_episodes_instrument_id_instruments_id_fk" FOREIGN KEY ("instrument_id") REFERENCES "public"."instruments"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "frames_instrument_taken_idx" ON "frames" USING btree ("instrument_id","taken_at");--> statement-breakpoint
CREATE INDEX "frames_sha_idx" ON "frames" USING btree ("sha256");--> statement-breakpoint
CREATE INDEX "workbench_runs_instrument_idx" ON "workbench_runs" USING btree ("instrument_id","created_at");--> statement-breakpoint
CREATE INDEX "calibration_versions_validity_idx" ON "calibration_versions" USING btree ("instrument_id","state","valid_from");--> statement-breakpoint
CREATE INDEX "spectra_instrument_idx" ON "spectra" USING btree ("instrument_id");--> statement-breakpoint
CREATE INDEX "spectra_stale_idx" ON "spectra" USING btree ("instrument_id") WHERE "spectra"."stale";--> statement-breakpoint
CREATE INDEX "runs_instrument_idx" ON "runs" USING btree ("instrument_id");--> statement-breakpoint
CREATE UNIQUE INDEX "drift_episodes_one_open" ON "drift_episodes" USING btree ("instrument_id") WHERE "drift_episodes"."closed_at" IS NULL;