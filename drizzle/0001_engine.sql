CREATE TYPE "public"."product_unit" AS ENUM('L', 'kg');--> statement-breakpoint
CREATE TYPE "public"."log_format" AS ENUM('csv', 'geojson', 'shapefile');--> statement-breakpoint
CREATE TYPE "public"."upload_status" AS ENUM('mapping', 'queued', 'processing', 'done', 'failed');--> statement-breakpoint
CREATE TABLE "machines" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"farm_id" uuid NOT NULL,
	"name" text NOT NULL,
	"boom_width_m" double precision NOT NULL,
	"nozzle_count" integer NOT NULL,
	"nozzle_spacing_m" double precision NOT NULL,
	"nozzles_per_sensor" integer DEFAULT 1 NOT NULL,
	"nozzle_flow_l_per_s" double precision,
	"reference_pressure_pa" double precision,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "products" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"farm_id" uuid NOT NULL,
	"name" text NOT NULL,
	"registration_number" text,
	"unit" "product_unit" NOT NULL,
	"price_per_unit" double precision,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "tank_mix_products" (
	"tank_mix_id" uuid NOT NULL,
	"product_id" uuid NOT NULL,
	"rate_per_m_2" double precision NOT NULL,
	CONSTRAINT "tank_mix_products_tank_mix_id_product_id_pk" PRIMARY KEY("tank_mix_id","product_id")
);
--> statement-breakpoint
CREATE TABLE "tank_mixes" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"farm_id" uuid NOT NULL,
	"name" text NOT NULL,
	"carrier_rate_l_per_m_2" double precision NOT NULL,
	"notes" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "column_mappings" (
	"farm_id" uuid NOT NULL,
	"signature" text NOT NULL,
	"mapping" jsonb NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "column_mappings_farmId_signature_unique" UNIQUE("farm_id","signature")
);
--> statement-breakpoint
CREATE TABLE "raw_files" (
	"sha256" text PRIMARY KEY NOT NULL,
	"size_bytes" bigint NOT NULL,
	"stored_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "uploads" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"farm_id" uuid NOT NULL,
	"uploaded_by" text,
	"file_name" text NOT NULL,
	"sha256" text NOT NULL,
	"size_bytes" bigint NOT NULL,
	"format" "log_format" NOT NULL,
	"status" "upload_status" DEFAULT 'mapping' NOT NULL,
	"machine_id" uuid,
	"tank_mix_id" uuid,
	"mapping" jsonb,
	"only_days" date[],
	"progress" double precision DEFAULT 0 NOT NULL,
	"error" text,
	"error_at" jsonb,
	"report" jsonb,
	"fixes_total" integer,
	"fixes_used" integer,
	"fixes_outside" integer,
	"attempts" integer DEFAULT 0 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"processed_at" timestamp with time zone,
	CONSTRAINT "uploads_farmId_sha256_unique" UNIQUE("farm_id","sha256")
);
--> statement-breakpoint
CREATE TABLE "application_fixes" (
	"application_id" uuid NOT NULL,
	"upload_id" uuid NOT NULL,
	"fix_count" integer NOT NULL,
	"packed" "bytea" NOT NULL,
	CONSTRAINT "application_fixes_application_id_upload_id_pk" PRIMARY KEY("application_id","upload_id")
);
--> statement-breakpoint
CREATE TABLE "applications" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"farm_id" uuid NOT NULL,
	"field_id" uuid NOT NULL,
	"tank_mix_id" uuid NOT NULL,
	"machine_id" uuid,
	"day" date NOT NULL,
	"season" integer NOT NULL,
	"started_at" timestamp with time zone NOT NULL,
	"ended_at" timestamp with time zone NOT NULL,
	"fix_count" integer NOT NULL,
	"covered_m_2" double precision NOT NULL,
	"sprayed_m_2" double precision NOT NULL,
	"volume_l" double precision NOT NULL,
	"computed_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "applications_fieldId_day_tankMixId_unique" UNIQUE("field_id","day","tank_mix_id")
);
--> statement-breakpoint
CREATE TABLE "cell_results" (
	"application_id" uuid NOT NULL,
	"field_id" uuid NOT NULL,
	"col" integer NOT NULL,
	"row" integer NOT NULL,
	"area_m_2" double precision NOT NULL,
	"covered_m_2" double precision NOT NULL,
	"sprayed_m_2" double precision NOT NULL,
	"volume_l" double precision NOT NULL,
	CONSTRAINT "cell_results_application_id_col_row_pk" PRIMARY KEY("application_id","col","row")
);
--> statement-breakpoint
ALTER TABLE "farms" ADD COLUMN "time_zone" text DEFAULT 'UTC' NOT NULL;--> statement-breakpoint
ALTER TABLE "farms" ADD COLUMN "currency" text DEFAULT 'USD' NOT NULL;--> statement-breakpoint
ALTER TABLE "fields" ADD COLUMN "area_m_2" double precision NOT NULL;--> statement-breakpoint
ALTER TABLE "fields" ADD COLUMN "grid_proj" text NOT NULL;--> statement-breakpoint
ALTER TABLE "fields" ADD COLUMN "grid_epsg" integer;--> statement-breakpoint
ALTER TABLE "fields" ADD COLUMN "grid_cell_m" double precision DEFAULT 10 NOT NULL;--> statement-breakpoint
ALTER TABLE "fields" ADD COLUMN "grid_origin_x" double precision NOT NULL;--> statement-breakpoint
ALTER TABLE "fields" ADD COLUMN "grid_origin_y" double precision NOT NULL;--> statement-breakpoint
ALTER TABLE "fields" ADD COLUMN "grid_cols" integer NOT NULL;--> statement-breakpoint
ALTER TABLE "fields" ADD COLUMN "grid_rows" integer NOT NULL;--> statement-breakpoint
ALTER TABLE "fields" ADD COLUMN "updated_at" timestamp with time zone DEFAULT now() NOT NULL;--> statement-breakpoint
ALTER TABLE "machines" ADD CONSTRAINT "machines_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "products" ADD CONSTRAINT "products_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "tank_mix_products" ADD CONSTRAINT "tank_mix_products_tank_mix_id_tank_mixes_id_fk" FOREIGN KEY ("tank_mix_id") REFERENCES "public"."tank_mixes"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "tank_mix_products" ADD CONSTRAINT "tank_mix_products_product_id_products_id_fk" FOREIGN KEY ("product_id") REFERENCES "public"."products"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "tank_mixes" ADD CONSTRAINT "tank_mixes_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "column_mappings" ADD CONSTRAINT "column_mappings_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_sha256_raw_files_sha256_fk" FOREIGN KEY ("sha256") REFERENCES "public"."raw_files"("sha256") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_machine_id_machines_id_fk" FOREIGN KEY ("machine_id") REFERENCES "public"."machines"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_tank_mix_id_tank_mixes_id_fk" FOREIGN KEY ("tank_mix_id") REFERENCES "public"."tank_mixes"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "application_fixes" ADD CONSTRAINT "application_fixes_application_id_applications_id_fk" FOREIGN KEY ("application_id") REFERENCES "public"."applications"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "application_fixes" ADD CONSTRAINT "application_fixes_upload_id_uploads_id_fk" FOREIGN KEY ("upload_id") REFERENCES "public"."uploads"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "applications" ADD CONSTRAINT "applications_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "applications" ADD CONSTRAINT "applications_field_id_fields_id_fk" FOREIGN KEY ("field_id") REFERENCES "public"."fields"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "applications" ADD CONSTRAINT "applications_tank_mix_id_tank_mixes_id_fk" FOREIGN KEY ("tank_mix_id") REFERENCES "public"."tank_mixes"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "applications" ADD CONSTRAINT "applications_machine_id_machines_id_fk" FOREIGN KEY ("machine_id") REFERENCES "public"."machines"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "cell_results" ADD CONSTRAINT "cell_results_application_id_applications_id_fk" FOREIGN KEY ("application_id") REFERENCES "public"."applications"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "cell_results" ADD CONSTRAINT "cell_results_field_id_fields_id_fk" FOREIGN KEY ("field_id") REFERENCES "public"."fields"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "machines_farm_id_index" ON "machines" USING btree ("farm_id");--> statement-breakpoint
CREATE INDEX "products_farm_id_index" ON "products" USING btree ("farm_id");--> statement-breakpoint
CREATE INDEX "tank_mix_products_product_id_index" ON "tank_mix_products" USING btree ("product_id");--> statement-breakpoint
CREATE INDEX "tank_mixes_farm_id_index" ON "tank_mixes" USING btree ("farm_id");--> statement-breakpoint
CREATE INDEX "uploads_farm_id_created_at_index" ON "uploads" USING btree ("farm_id","created_at");--> statement-breakpoint
CREATE INDEX "application_fixes_upload_id_index" ON "application_fixes" USING btree ("upload_id");--> statement-breakpoint
CREATE INDEX "applications_farm_id_season_index" ON "applications" USING btree ("farm_id","season");--> statement-breakpoint
CREATE INDEX "applications_field_id_season_index" ON "applications" USING btree ("field_id","season");--> statement-breakpoint
CREATE INDEX "cell_results_field_id_col_row_index" ON "cell_results" USING btree ("field_id","col","row");