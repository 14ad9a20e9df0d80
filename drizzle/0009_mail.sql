CREATE TABLE "dev_outbox" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"received_at" timestamp with time zone DEFAULT now() NOT NULL,
	"envelope_from" text NOT NULL,
	"envelope_to" text[] NOT NULL,
	"message_id" text,
	"subject" text NOT NULL,
	"farm_id" uuid,
	"kind" text,
	"text_body" text,
	"html_body" text,
	"raw" text NOT NULL
);
--> statement-breakpoint
CREATE INDEX "dev_outbox_farm_id_received_at_index" ON "dev_outbox" USING btree ("farm_id","received_at");--> statement-breakpoint
CREATE INDEX "dev_outbox_received_at_index" ON "dev_outbox" USING btree ("received_at");