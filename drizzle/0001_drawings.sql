CREATE TABLE "part_view" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organization_id" text NOT NULL,
	"part_id" uuid NOT NULL,
	"name" text NOT NULL,
	"position" integer DEFAULT 0 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "view_revision" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organization_id" text NOT NULL,
	"view_id" uuid NOT NULL,
	"revision" integer NOT NULL,
	"label" text NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"original_key" text NOT NULL,
	"original_type" text NOT NULL,
	"original_bytes" integer NOT NULL,
	"original_width" integer NOT NULL,
	"original_height" integer NOT NULL,
	"display_key" text NOT NULL,
	"width" integer NOT NULL,
	"height" integer NOT NULL,
	"thumb_key" text NOT NULL,
	"thumb_width" integer NOT NULL,
	"thumb_height" integer NOT NULL,
	"grid_columns" integer,
	"grid_rows" integer,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "part_view" ADD CONSTRAINT "part_view_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "part_view" ADD CONSTRAINT "part_view_part_id_part_id_fk" FOREIGN KEY ("part_id") REFERENCES "public"."part"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "view_revision" ADD CONSTRAINT "view_revision_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "view_revision" ADD CONSTRAINT "view_revision_view_id_part_view_id_fk" FOREIGN KEY ("view_id") REFERENCES "public"."part_view"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "view_revision" ADD CONSTRAINT "view_revision_created_by_user_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "part_view_part_id_name_index" ON "part_view" USING btree ("part_id","name");--> statement-breakpoint
CREATE UNIQUE INDEX "view_revision_view_id_revision_index" ON "view_revision" USING btree ("view_id","revision");--> statement-breakpoint
CREATE INDEX "view_revision_organization_id_index" ON "view_revision" USING btree ("organization_id");