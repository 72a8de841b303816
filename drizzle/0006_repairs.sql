CREATE TABLE "repair" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organization_id" text NOT NULL,
	"part_id" uuid NOT NULL,
	"tool_id" uuid NOT NULL,
	"cavity" integer,
	"view_id" uuid NOT NULL,
	"zones" text[] DEFAULT '{}' NOT NULL,
	"regions" text[] DEFAULT '{}' NOT NULL,
	"defect_type_ids" uuid[] DEFAULT '{}' NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"state" text DEFAULT 'requested' NOT NULL,
	"assignee_id" text,
	"evidence" jsonb NOT NULL,
	"evidence_image_key" text,
	"repair_date" timestamp with time zone,
	"work_done" text DEFAULT '' NOT NULL,
	"verification" jsonb,
	"requested_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"accepted_at" timestamp with time zone,
	"done_at" timestamp with time zone,
	"verified_by" text,
	"verified_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "repair" ADD CONSTRAINT "repair_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "repair" ADD CONSTRAINT "repair_part_id_part_id_fk" FOREIGN KEY ("part_id") REFERENCES "public"."part"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "repair" ADD CONSTRAINT "repair_tool_id_tool_id_fk" FOREIGN KEY ("tool_id") REFERENCES "public"."tool"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "repair" ADD CONSTRAINT "repair_assignee_id_user_id_fk" FOREIGN KEY ("assignee_id") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "repair" ADD CONSTRAINT "repair_requested_by_user_id_fk" FOREIGN KEY ("requested_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "repair" ADD CONSTRAINT "repair_verified_by_user_id_fk" FOREIGN KEY ("verified_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "repair_organization_id_state_index" ON "repair" USING btree ("organization_id","state");--> statement-breakpoint
CREATE INDEX "repair_tool_id_index" ON "repair" USING btree ("tool_id");