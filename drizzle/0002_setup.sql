CREATE TABLE "defect_type" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organization_id" text NOT NULL,
	"code" text NOT NULL,
	"name" text NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	"colour" text NOT NULL,
	"shape" text NOT NULL,
	"severity" text NOT NULL,
	"all_parts" boolean DEFAULT true NOT NULL,
	"position" integer DEFAULT 0 NOT NULL,
	"retired_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "defect_type_part" (
	"defect_type_id" uuid NOT NULL,
	"part_id" uuid NOT NULL,
	CONSTRAINT "defect_type_part_defect_type_id_part_id_pk" PRIMARY KEY("defect_type_id","part_id")
);
--> statement-breakpoint
CREATE TABLE "demerit_weights" (
	"organization_id" text PRIMARY KEY NOT NULL,
	"a" double precision DEFAULT 100 NOT NULL,
	"b" double precision DEFAULT 50 NOT NULL,
	"c" double precision DEFAULT 10 NOT NULL,
	"d" double precision DEFAULT 1 NOT NULL
);
--> statement-breakpoint
CREATE TABLE "region" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organization_id" text NOT NULL,
	"revision_id" uuid NOT NULL,
	"name" text NOT NULL,
	"points" jsonb NOT NULL,
	"area" double precision NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "sampling_plan" (
	"part_id" uuid PRIMARY KEY NOT NULL,
	"organization_id" text NOT NULL,
	"basis" text DEFAULT 'units' NOT NULL,
	"sample_size" double precision NOT NULL,
	"unit_name" text DEFAULT 'unit' NOT NULL,
	"frequency" text NOT NULL,
	"every_hours" integer,
	"defect_type_ids" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"photo_for_severe" boolean DEFAULT false NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "defect_type" ADD CONSTRAINT "defect_type_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "defect_type_part" ADD CONSTRAINT "defect_type_part_defect_type_id_defect_type_id_fk" FOREIGN KEY ("defect_type_id") REFERENCES "public"."defect_type"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "defect_type_part" ADD CONSTRAINT "defect_type_part_part_id_part_id_fk" FOREIGN KEY ("part_id") REFERENCES "public"."part"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "demerit_weights" ADD CONSTRAINT "demerit_weights_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "region" ADD CONSTRAINT "region_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "region" ADD CONSTRAINT "region_revision_id_view_revision_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."view_revision"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sampling_plan" ADD CONSTRAINT "sampling_plan_part_id_part_id_fk" FOREIGN KEY ("part_id") REFERENCES "public"."part"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sampling_plan" ADD CONSTRAINT "sampling_plan_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "defect_type_organization_id_code_index" ON "defect_type" USING btree ("organization_id","code");--> statement-breakpoint
CREATE INDEX "defect_type_organization_id_position_index" ON "defect_type" USING btree ("organization_id","position");--> statement-breakpoint
CREATE INDEX "defect_type_part_part_id_index" ON "defect_type_part" USING btree ("part_id");--> statement-breakpoint
CREATE UNIQUE INDEX "region_revision_id_name_index" ON "region" USING btree ("revision_id","name");