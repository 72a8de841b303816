CREATE TABLE "digest_subscription" (
	"organization_id" text NOT NULL,
	"user_id" text NOT NULL,
	"part_id" uuid NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "digest_subscription_user_id_part_id_pk" PRIMARY KEY("user_id","part_id")
);
--> statement-breakpoint
CREATE TABLE "station_key" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organization_id" text NOT NULL,
	"name" text NOT NULL,
	"prefix" text NOT NULL,
	"secret_hash" text NOT NULL,
	"part_ids" uuid[] DEFAULT '{}' NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"last_used_at" timestamp with time zone,
	"revoked_at" timestamp with time zone,
	"revoked_by" text,
	CONSTRAINT "station_key_secretHash_unique" UNIQUE("secret_hash")
);
--> statement-breakpoint
CREATE TABLE "view_transform" (
	"view_id" uuid PRIMARY KEY NOT NULL,
	"organization_id" text NOT NULL,
	"kind" text NOT NULL,
	"points" jsonb NOT NULL,
	"matrix" double precision[] NOT NULL,
	"frame_width" double precision,
	"frame_height" double precision,
	"updated_by" text,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "sample" ADD COLUMN "source" text DEFAULT 'bench' NOT NULL;--> statement-breakpoint
ALTER TABLE "sample" ADD COLUMN "station_key_id" uuid;--> statement-breakpoint
ALTER TABLE "digest_subscription" ADD CONSTRAINT "digest_subscription_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "digest_subscription" ADD CONSTRAINT "digest_subscription_user_id_user_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."user"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "digest_subscription" ADD CONSTRAINT "digest_subscription_part_id_part_id_fk" FOREIGN KEY ("part_id") REFERENCES "public"."part"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "station_key" ADD CONSTRAINT "station_key_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "station_key" ADD CONSTRAINT "station_key_created_by_user_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "station_key" ADD CONSTRAINT "station_key_revoked_by_user_id_fk" FOREIGN KEY ("revoked_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "view_transform" ADD CONSTRAINT "view_transform_view_id_part_view_id_fk" FOREIGN KEY ("view_id") REFERENCES "public"."part_view"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "view_transform" ADD CONSTRAINT "view_transform_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "view_transform" ADD CONSTRAINT "view_transform_updated_by_user_id_fk" FOREIGN KEY ("updated_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "digest_subscription_organization_id_index" ON "digest_subscription" USING btree ("organization_id");--> statement-breakpoint
CREATE INDEX "station_key_organization_id_index" ON "station_key" USING btree ("organization_id");--> statement-breakpoint
ALTER TABLE "sample" ADD CONSTRAINT "sample_station_key_id_station_key_id_fk" FOREIGN KEY ("station_key_id") REFERENCES "public"."station_key"("id") ON DELETE set null ON UPDATE no action;