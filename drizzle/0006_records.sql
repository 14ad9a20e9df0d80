CREATE TYPE "public"."record_status" AS ENUM('draft', 'signed');--> statement-breakpoint
CREATE TABLE "application_quality" (
	"application_id" uuid PRIMARY KEY NOT NULL,
	"summary" jsonb NOT NULL,
	"segments" jsonb NOT NULL,
	"segment_count" integer NOT NULL,
	"computed_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "application_records" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"farm_id" uuid NOT NULL,
	"application_id" uuid,
	"status" "record_status" DEFAULT 'draft' NOT NULL,
	"applicator_name" text,
	"applicator_certification" text,
	"supervised_applicators" text,
	"client_name" text,
	"client_address" text,
	"location_description" text,
	"crop" text,
	"target_weeds" text,
	"wind_speed_m_per_s" double precision,
	"wind_from" text,
	"air_temperature_c" double precision,
	"relative_humidity_percent" double precision,
	"inversion_note" text,
	"notes" text,
	"registration_numbers" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"signed_facts" jsonb,
	"signed_by" text,
	"signed_by_name" text,
	"signed_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_by" text,
	CONSTRAINT "application_records_applicationId_unique" UNIQUE("application_id")
);
--> statement-breakpoint
CREATE TABLE "record_amendments" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"record_id" uuid NOT NULL,
	"farm_id" uuid NOT NULL,
	"amended_by" text,
	"amended_by_name" text NOT NULL,
	"amended_at" timestamp with time zone DEFAULT now() NOT NULL,
	"reason" text NOT NULL,
	"changes" jsonb NOT NULL
);
--> statement-breakpoint
ALTER TABLE "machines" ADD COLUMN "max_speed_m_per_s" double precision;--> statement-breakpoint
ALTER TABLE "machines" ADD COLUMN "target_height_m" double precision;--> statement-breakpoint
ALTER TABLE "machines" ADD COLUMN "height_tolerance_m" double precision;--> statement-breakpoint
ALTER TABLE "machines" ADD COLUMN "pressure_min_pa" double precision;--> statement-breakpoint
ALTER TABLE "machines" ADD COLUMN "pressure_max_pa" double precision;--> statement-breakpoint
ALTER TABLE "application_quality" ADD CONSTRAINT "application_quality_application_id_applications_id_fk" FOREIGN KEY ("application_id") REFERENCES "public"."applications"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "application_records" ADD CONSTRAINT "application_records_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "application_records" ADD CONSTRAINT "application_records_application_id_applications_id_fk" FOREIGN KEY ("application_id") REFERENCES "public"."applications"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "application_records" ADD CONSTRAINT "application_records_signed_by_users_id_fk" FOREIGN KEY ("signed_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "application_records" ADD CONSTRAINT "application_records_updated_by_users_id_fk" FOREIGN KEY ("updated_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "record_amendments" ADD CONSTRAINT "record_amendments_record_id_application_records_id_fk" FOREIGN KEY ("record_id") REFERENCES "public"."application_records"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "record_amendments" ADD CONSTRAINT "record_amendments_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "record_amendments" ADD CONSTRAINT "record_amendments_amended_by_users_id_fk" FOREIGN KEY ("amended_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "application_records_farm_id_status_index" ON "application_records" USING btree ("farm_id","status");--> statement-breakpoint
CREATE INDEX "record_amendments_record_id_amended_at_index" ON "record_amendments" USING btree ("record_id","amended_at");--> statement-breakpoint
CREATE INDEX "record_amendments_farm_id_index" ON "record_amendments" USING btree ("farm_id");