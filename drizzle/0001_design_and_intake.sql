CREATE TABLE "amendment_batch" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"amendment_id" uuid NOT NULL,
	"label" text NOT NULL,
	"received_on" date,
	"moisture_wet_basis_pct" double precision,
	"total_carbon_dry_pct" double precision,
	"total_nitrogen_dry_pct" double precision,
	"ph" double precision,
	"ec_ds_per_m" double precision,
	"composting_method" text,
	"notes" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "amendment" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"program_id" text NOT NULL,
	"name" text NOT NULL,
	"material" text NOT NULL,
	"description" text,
	"source" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "batch_temperature_reading" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"batch_id" uuid NOT NULL,
	"read_at" timestamp NOT NULL,
	"probe_c" double precision NOT NULL,
	"turned" boolean DEFAULT false NOT NULL
);
--> statement-breakpoint
CREATE TABLE "column_mapping" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"program_id" text NOT NULL,
	"kind" text NOT NULL,
	"header_signature" text NOT NULL,
	"mapping" jsonb NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "custom_variable" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"program_id" text NOT NULL,
	"variable_id" text NOT NULL,
	"label" text NOT NULL,
	"unit" text NOT NULL,
	"decimals" integer DEFAULT 2 NOT NULL,
	"min_value" double precision,
	"max_value" double precision,
	"description" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "lab_method" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"program_id" text NOT NULL,
	"name" text NOT NULL,
	"ignition_c" double precision,
	"ignition_hours" double precision,
	"som_slope" double precision DEFAULT 1 NOT NULL,
	"som_intercept" double precision DEFAULT 0 NOT NULL,
	"notes" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "reference_mass" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"trial_id" uuid NOT NULL,
	"top_cm" double precision NOT NULL,
	"bottom_cm" double precision NOT NULL,
	"mass_mg_per_ha" double precision NOT NULL,
	"fixed_by" text,
	"fixed_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "treatment_application" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"treatment_id" uuid NOT NULL,
	"batch_id" uuid,
	"rate_mg_dm_per_ha" double precision,
	"layer_depth_cm" double precision,
	"timing" text DEFAULT 'once' NOT NULL,
	"every_n_weeks" integer,
	"notes" text
);
--> statement-breakpoint
CREATE TABLE "trial_factor" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"trial_id" uuid NOT NULL,
	"name" text NOT NULL,
	"levels" jsonb NOT NULL,
	"stratum" text,
	"position" integer DEFAULT 0 NOT NULL
);
--> statement-breakpoint
ALTER TABLE "plot" ADD COLUMN "field_row" integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE "plot" ADD COLUMN "field_column" integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE "treatment" ADD COLUMN "factor_levels" jsonb;--> statement-breakpoint
ALTER TABLE "trial" ADD COLUMN "arrangement" text DEFAULT 'straight' NOT NULL;--> statement-breakpoint
ALTER TABLE "trial" ADD COLUMN "block_orientation" text DEFAULT 'rows' NOT NULL;--> statement-breakpoint
ALTER TABLE "trial" ADD COLUMN "lab_method_id" uuid;--> statement-breakpoint
ALTER TABLE "upload" ADD COLUMN "event_id" uuid;--> statement-breakpoint
ALTER TABLE "upload" ADD COLUMN "parse_options" jsonb;--> statement-breakpoint
ALTER TABLE "amendment_batch" ADD CONSTRAINT "amendment_batch_amendment_id_amendment_id_fk" FOREIGN KEY ("amendment_id") REFERENCES "public"."amendment"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "amendment" ADD CONSTRAINT "amendment_program_id_organization_id_fk" FOREIGN KEY ("program_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "batch_temperature_reading" ADD CONSTRAINT "batch_temperature_reading_batch_id_amendment_batch_id_fk" FOREIGN KEY ("batch_id") REFERENCES "public"."amendment_batch"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "column_mapping" ADD CONSTRAINT "column_mapping_program_id_organization_id_fk" FOREIGN KEY ("program_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "custom_variable" ADD CONSTRAINT "custom_variable_program_id_organization_id_fk" FOREIGN KEY ("program_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lab_method" ADD CONSTRAINT "lab_method_program_id_organization_id_fk" FOREIGN KEY ("program_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reference_mass" ADD CONSTRAINT "reference_mass_trial_id_trial_id_fk" FOREIGN KEY ("trial_id") REFERENCES "public"."trial"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reference_mass" ADD CONSTRAINT "reference_mass_fixed_by_user_id_fk" FOREIGN KEY ("fixed_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "treatment_application" ADD CONSTRAINT "treatment_application_treatment_id_treatment_id_fk" FOREIGN KEY ("treatment_id") REFERENCES "public"."treatment"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "treatment_application" ADD CONSTRAINT "treatment_application_batch_id_amendment_batch_id_fk" FOREIGN KEY ("batch_id") REFERENCES "public"."amendment_batch"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "trial_factor" ADD CONSTRAINT "trial_factor_trial_id_trial_id_fk" FOREIGN KEY ("trial_id") REFERENCES "public"."trial"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "batch_amendment_label_idx" ON "amendment_batch" USING btree ("amendment_id","label");--> statement-breakpoint
CREATE UNIQUE INDEX "amendment_program_name_idx" ON "amendment" USING btree ("program_id","name");--> statement-breakpoint
CREATE INDEX "temperature_batch_idx" ON "batch_temperature_reading" USING btree ("batch_id","read_at");--> statement-breakpoint
CREATE UNIQUE INDEX "column_mapping_key_idx" ON "column_mapping" USING btree ("program_id","kind","header_signature");--> statement-breakpoint
CREATE UNIQUE INDEX "custom_variable_program_id_idx" ON "custom_variable" USING btree ("program_id","variable_id");--> statement-breakpoint
CREATE UNIQUE INDEX "lab_method_program_name_idx" ON "lab_method" USING btree ("program_id","name");--> statement-breakpoint
CREATE UNIQUE INDEX "reference_mass_span_idx" ON "reference_mass" USING btree ("trial_id","top_cm","bottom_cm");--> statement-breakpoint
CREATE INDEX "application_treatment_idx" ON "treatment_application" USING btree ("treatment_id");--> statement-breakpoint
CREATE UNIQUE INDEX "factor_trial_name_idx" ON "trial_factor" USING btree ("trial_id","name");--> statement-breakpoint
ALTER TABLE "upload" ADD CONSTRAINT "upload_event_id_sampling_event_id_fk" FOREIGN KEY ("event_id") REFERENCES "public"."sampling_event"("id") ON DELETE restrict ON UPDATE no action;