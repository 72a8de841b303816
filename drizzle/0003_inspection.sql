CREATE TABLE "pin" (
	"id" uuid PRIMARY KEY NOT NULL,
	"organization_id" text NOT NULL,
	"sample_id" uuid NOT NULL,
	"unit_index" integer NOT NULL,
	"revision_id" uuid NOT NULL,
	"defect_type_id" uuid NOT NULL,
	"x" double precision NOT NULL,
	"y" double precision NOT NULL,
	"zone" text,
	"regions" text[] DEFAULT '{}' NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"deleted_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "sample" (
	"id" uuid PRIMARY KEY NOT NULL,
	"organization_id" text NOT NULL,
	"part_id" uuid NOT NULL,
	"tool_id" uuid,
	"cavity" integer,
	"shift" text DEFAULT '' NOT NULL,
	"lot" text DEFAULT '' NOT NULL,
	"inspector_id" text,
	"taken_at" timestamp with time zone DEFAULT now() NOT NULL,
	"size" double precision NOT NULL,
	"unit_name" text DEFAULT 'unit' NOT NULL,
	"unit_count" integer NOT NULL,
	"state" text DEFAULT 'open' NOT NULL,
	"closed_at" timestamp with time zone,
	"closed_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "sample_unit" (
	"sample_id" uuid NOT NULL,
	"index" integer NOT NULL,
	"serial" text DEFAULT '' NOT NULL,
	"clean" boolean DEFAULT false NOT NULL,
	CONSTRAINT "sample_unit_sample_id_index_pk" PRIMARY KEY("sample_id","index")
);
--> statement-breakpoint
ALTER TABLE "sampling_plan" ADD COLUMN "shared_samples" boolean DEFAULT false NOT NULL;--> statement-breakpoint
ALTER TABLE "pin" ADD CONSTRAINT "pin_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "pin" ADD CONSTRAINT "pin_sample_id_sample_id_fk" FOREIGN KEY ("sample_id") REFERENCES "public"."sample"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "pin" ADD CONSTRAINT "pin_revision_id_view_revision_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."view_revision"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "pin" ADD CONSTRAINT "pin_defect_type_id_defect_type_id_fk" FOREIGN KEY ("defect_type_id") REFERENCES "public"."defect_type"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "pin" ADD CONSTRAINT "pin_created_by_user_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sample" ADD CONSTRAINT "sample_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sample" ADD CONSTRAINT "sample_part_id_part_id_fk" FOREIGN KEY ("part_id") REFERENCES "public"."part"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sample" ADD CONSTRAINT "sample_tool_id_tool_id_fk" FOREIGN KEY ("tool_id") REFERENCES "public"."tool"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sample" ADD CONSTRAINT "sample_inspector_id_user_id_fk" FOREIGN KEY ("inspector_id") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sample" ADD CONSTRAINT "sample_closed_by_user_id_fk" FOREIGN KEY ("closed_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sample_unit" ADD CONSTRAINT "sample_unit_sample_id_sample_id_fk" FOREIGN KEY ("sample_id") REFERENCES "public"."sample"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "pin_sample_id_unit_index_index" ON "pin" USING btree ("sample_id","unit_index");--> statement-breakpoint
CREATE INDEX "pin_revision_id_index" ON "pin" USING btree ("revision_id");--> statement-breakpoint
CREATE INDEX "pin_organization_id_defect_type_id_index" ON "pin" USING btree ("organization_id","defect_type_id");--> statement-breakpoint
CREATE INDEX "sample_organization_id_part_id_taken_at_index" ON "sample" USING btree ("organization_id","part_id","taken_at");--> statement-breakpoint
CREATE UNIQUE INDEX "sample_one_open_per_inspector" ON "sample" USING btree ("inspector_id","part_id") WHERE "sample"."state" = 'open';