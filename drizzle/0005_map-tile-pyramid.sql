CREATE TABLE "map_tile_sets" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"farm_id" uuid NOT NULL,
	"dataset" text NOT NULL,
	"threshold_percent" real NOT NULL,
	"version" text NOT NULL,
	"min_zoom" integer NOT NULL,
	"max_zoom" integer NOT NULL,
	"tile_count" integer NOT NULL,
	"bytes" integer NOT NULL,
	"render_ms" integer NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "map_tiles" (
	"set_id" uuid NOT NULL,
	"z" integer NOT NULL,
	"x" integer NOT NULL,
	"y" integer NOT NULL,
	"body" "bytea" NOT NULL,
	CONSTRAINT "map_tiles_set_id_z_x_y_pk" PRIMARY KEY("set_id","z","x","y")
);
--> statement-breakpoint
ALTER TABLE "map_tile_sets" ADD CONSTRAINT "map_tile_sets_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "map_tiles" ADD CONSTRAINT "map_tiles_set_id_map_tile_sets_id_fk" FOREIGN KEY ("set_id") REFERENCES "public"."map_tile_sets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "map_tile_sets_farm_id_dataset_index" ON "map_tile_sets" USING btree ("farm_id","dataset");