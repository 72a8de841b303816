CREATE TABLE "history_count" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organization_id" text NOT NULL,
	"part_id" uuid NOT NULL,
	"import_id" uuid NOT NULL,
	"sample_key" text NOT NULL,
	"taken_at" timestamp with time zone NOT NULL,
	"size" double precision NOT NULL,
	"count" integer NOT NULL,
	"defect_type_id" uuid,
	"tool_id" uuid,
	"cavity" integer,
	"shift" text DEFAULT '' NOT NULL,
	"lot" text DEFAULT '' NOT NULL,
	"line" integer NOT NULL,
	CONSTRAINT "history_count_one_row_per_type" UNIQUE NULLS NOT DISTINCT("part_id","sample_key","defect_type_id")
);
--> statement-breakpoint
CREATE TABLE "history_import" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organization_id" text NOT NULL,
	"part_id" uuid NOT NULL,
	"file_name" text DEFAULT '' NOT NULL,
	"row_count" integer NOT NULL,
	"sample_count" integer NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "limit_set" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organization_id" text NOT NULL,
	"part_id" uuid NOT NULL,
	"method" text NOT NULL,
	"filters" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"chart_key" text NOT NULL,
	"k" double precision DEFAULT 3 NOT NULL,
	"baseline_from" timestamp with time zone,
	"baseline_to" timestamp with time zone,
	"baseline_samples" text[],
	"exclusions" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"rate" double precision NOT NULL,
	"sigma_z" double precision,
	"class_rates" jsonb,
	"sample_count" integer NOT NULL,
	"applies_from" timestamp with time zone NOT NULL,
	"state" text DEFAULT 'trial' NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"frozen_by" text,
	"frozen_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "signal" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organization_id" text NOT NULL,
	"part_id" uuid NOT NULL,
	"limit_set_id" uuid NOT NULL,
	"chart_key" text NOT NULL,
	"method" text NOT NULL,
	"sample_ref" text NOT NULL,
	"sample_id" uuid,
	"taken_at" timestamp with time zone NOT NULL,
	"rule" text NOT NULL,
	"direction" text NOT NULL,
	"message" text NOT NULL,
	"value" double precision NOT NULL,
	"ucl" double precision NOT NULL,
	"lcl" double precision NOT NULL,
	"state" text DEFAULT 'new' NOT NULL,
	"cause" text DEFAULT '' NOT NULL,
	"action" text DEFAULT '' NOT NULL,
	"acknowledged_by" text,
	"acknowledged_at" timestamp with time zone,
	"explained_by" text,
	"explained_at" timestamp with time zone,
	"closed_by" text,
	"closed_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "signal_once" UNIQUE("limit_set_id","sample_ref","rule")
);
--> statement-breakpoint
ALTER TABLE "history_count" ADD CONSTRAINT "history_count_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "history_count" ADD CONSTRAINT "history_count_part_id_part_id_fk" FOREIGN KEY ("part_id") REFERENCES "public"."part"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "history_count" ADD CONSTRAINT "history_count_import_id_history_import_id_fk" FOREIGN KEY ("import_id") REFERENCES "public"."history_import"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "history_count" ADD CONSTRAINT "history_count_defect_type_id_defect_type_id_fk" FOREIGN KEY ("defect_type_id") REFERENCES "public"."defect_type"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "history_count" ADD CONSTRAINT "history_count_tool_id_tool_id_fk" FOREIGN KEY ("tool_id") REFERENCES "public"."tool"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "history_import" ADD CONSTRAINT "history_import_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "history_import" ADD CONSTRAINT "history_import_part_id_part_id_fk" FOREIGN KEY ("part_id") REFERENCES "public"."part"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "history_import" ADD CONSTRAINT "history_import_created_by_user_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "limit_set" ADD CONSTRAINT "limit_set_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "limit_set" ADD CONSTRAINT "limit_set_part_id_part_id_fk" FOREIGN KEY ("part_id") REFERENCES "public"."part"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "limit_set" ADD CONSTRAINT "limit_set_created_by_user_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "limit_set" ADD CONSTRAINT "limit_set_frozen_by_user_id_fk" FOREIGN KEY ("frozen_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "signal" ADD CONSTRAINT "signal_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "signal" ADD CONSTRAINT "signal_part_id_part_id_fk" FOREIGN KEY ("part_id") REFERENCES "public"."part"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "signal" ADD CONSTRAINT "signal_limit_set_id_limit_set_id_fk" FOREIGN KEY ("limit_set_id") REFERENCES "public"."limit_set"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "signal" ADD CONSTRAINT "signal_sample_id_sample_id_fk" FOREIGN KEY ("sample_id") REFERENCES "public"."sample"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "signal" ADD CONSTRAINT "signal_acknowledged_by_user_id_fk" FOREIGN KEY ("acknowledged_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "signal" ADD CONSTRAINT "signal_explained_by_user_id_fk" FOREIGN KEY ("explained_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "signal" ADD CONSTRAINT "signal_closed_by_user_id_fk" FOREIGN KEY ("closed_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "history_count_organization_id_part_id_taken_at_index" ON "history_count" USING btree ("organization_id","part_id","taken_at");--> statement-breakpoint
CREATE INDEX "limit_set_organization_id_part_id_chart_key_applies_from_index" ON "limit_set" USING btree ("organization_id","part_id","chart_key","applies_from");--> statement-breakpoint
CREATE INDEX "signal_organization_id_state_created_at_index" ON "signal" USING btree ("organization_id","state","created_at");--> statement-breakpoint
CREATE INDEX "signal_part_id_created_at_index" ON "signal" USING btree ("part_id","created_at");