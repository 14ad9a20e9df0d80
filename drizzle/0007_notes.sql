CREATE TABLE "notes" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"farm_id" uuid NOT NULL,
	"field_id" uuid,
	"zone_id" uuid,
	"season" integer NOT NULL,
	"lng" double precision NOT NULL,
	"lat" double precision NOT NULL,
	"body" text NOT NULL,
	"photo_sha256" text,
	"photo_type" text,
	"photo_bytes" integer,
	"thumb_sha256" text,
	"author_id" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "notes" ADD CONSTRAINT "notes_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "notes" ADD CONSTRAINT "notes_field_id_fields_id_fk" FOREIGN KEY ("field_id") REFERENCES "public"."fields"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "notes" ADD CONSTRAINT "notes_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "notes_farm_id_season_index" ON "notes" USING btree ("farm_id","season");--> statement-breakpoint
CREATE INDEX "notes_field_id_index" ON "notes" USING btree ("field_id");--> statement-breakpoint
CREATE INDEX "notes_author_id_index" ON "notes" USING btree ("author_id");