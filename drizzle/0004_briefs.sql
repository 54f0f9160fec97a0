CREATE TYPE "public"."brief_status" AS ENUM('queued', 'rendering', 'done', 'failed');--> statement-breakpoint
CREATE TABLE "brief_shares" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"brief_id" uuid NOT NULL,
	"token_hash" text NOT NULL,
	"created_by" uuid NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"revoked_at" timestamp with time zone,
	CONSTRAINT "brief_shares_token_hash_unique" UNIQUE("token_hash")
);
--> statement-breakpoint
CREATE TABLE "glow_estimates" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"created_by" uuid NOT NULL,
	"name" text NOT NULL,
	"proposed" jsonb NOT NULL,
	"existing_sources" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"results" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "hearing_briefs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"created_by" uuid NOT NULL,
	"site_ids" uuid[] NOT NULL,
	"period_from" date NOT NULL,
	"period_to" date NOT NULL,
	"params" jsonb DEFAULT '{"glowEstimateIds":[]}'::jsonb NOT NULL,
	"status" "brief_status" DEFAULT 'queued' NOT NULL,
	"progress" integer DEFAULT 0 NOT NULL,
	"error" text,
	"attempts" integer DEFAULT 0 NOT NULL,
	"pdf" "bytea",
	"size_bytes" integer,
	"sha256" text,
	"verification_code" text,
	"verification" jsonb,
	"render_ms" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "brief_shares" ADD CONSTRAINT "brief_shares_brief_id_hearing_briefs_id_fk" FOREIGN KEY ("brief_id") REFERENCES "public"."hearing_briefs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "brief_shares" ADD CONSTRAINT "brief_shares_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "glow_estimates" ADD CONSTRAINT "glow_estimates_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "hearing_briefs" ADD CONSTRAINT "hearing_briefs_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "brief_shares_brief_idx" ON "brief_shares" USING btree ("brief_id");--> statement-breakpoint
CREATE INDEX "glow_estimates_created_by_idx" ON "glow_estimates" USING btree ("created_by");--> statement-breakpoint
CREATE INDEX "hearing_briefs_created_by_idx" ON "hearing_briefs" USING btree ("created_by");--> statement-breakpoint
CREATE INDEX "hearing_briefs_code_idx" ON "hearing_briefs" USING btree ("verification_code");