CREATE TYPE "public"."zone_source" AS ENUM('drawn', 'imported', 'hotspots');--> statement-breakpoint
CREATE TABLE "zone_results" (
	"zone_id" uuid NOT NULL,
	"application_id" uuid NOT NULL,
	"zone_geometry_at" timestamp with time zone NOT NULL,
	"application_computed_at" timestamp with time zone NOT NULL,
	"covered_m_2" double precision NOT NULL,
	"sprayed_m_2" double precision NOT NULL,
	"volume_l" double precision NOT NULL,
	"computed_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "zone_results_zone_id_application_id_pk" PRIMARY KEY("zone_id","application_id")
);
--> statement-breakpoint
CREATE TABLE "zones" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"farm_id" uuid NOT NULL,
	"field_id" uuid NOT NULL,
	"name" text NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	"geometry" jsonb NOT NULL,
	"area_m_2" double precision NOT NULL,
	"source" "zone_source" NOT NULL,
	"season" integer,
	"origin" jsonb,
	"target_rate_l_per_m_2" double precision,
	"created_by" text,
	"updated_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"geometry_updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "zone_results" ADD CONSTRAINT "zone_results_zone_id_zones_id_fk" FOREIGN KEY ("zone_id") REFERENCES "public"."zones"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "zone_results" ADD CONSTRAINT "zone_results_application_id_applications_id_fk" FOREIGN KEY ("application_id") REFERENCES "public"."applications"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "zones" ADD CONSTRAINT "zones_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "zones" ADD CONSTRAINT "zones_field_id_fields_id_fk" FOREIGN KEY ("field_id") REFERENCES "public"."fields"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "zones" ADD CONSTRAINT "zones_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "zones" ADD CONSTRAINT "zones_updated_by_users_id_fk" FOREIGN KEY ("updated_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "zone_results_application_id_index" ON "zone_results" USING btree ("application_id");--> statement-breakpoint
CREATE INDEX "zones_farm_id_index" ON "zones" USING btree ("farm_id");--> statement-breakpoint
CREATE INDEX "zones_field_id_index" ON "zones" USING btree ("field_id");--> statement-breakpoint
CREATE UNIQUE INDEX "zones_field_name_unique" ON "zones" USING btree ("field_id",lower("name"));--> statement-breakpoint
ALTER TABLE "notes" ADD CONSTRAINT "notes_zone_id_zones_id_fk" FOREIGN KEY ("zone_id") REFERENCES "public"."zones"("id") ON DELETE set null ON UPDATE no action;