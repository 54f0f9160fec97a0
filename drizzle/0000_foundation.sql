CREATE TYPE "public"."role" AS ENUM('volunteer', 'steward', 'advocate', 'admin');--> statement-breakpoint
CREATE TYPE "public"."user_status" AS ENUM('active', 'suspended');--> statement-breakpoint
CREATE TYPE "public"."lighting_zone" AS ENUM('E0', 'E1', 'E2', 'E3', 'E4');--> statement-breakpoint
CREATE TYPE "public"."station_approval" AS ENUM('none', 'pending', 'approved', 'declined');--> statement-breakpoint
CREATE TYPE "public"."station_status" AS ENUM('active', 'retired');--> statement-breakpoint
CREATE TYPE "public"."reading_source" AS ENUM('post', 'upload', 'survey', 'seed');--> statement-breakpoint
CREATE TYPE "public"."upload_status" AS ENUM('stored', 'queued', 'importing', 'done', 'failed');--> statement-breakpoint
CREATE TABLE "accounts" (
	"user_id" uuid NOT NULL,
	"type" text NOT NULL,
	"provider" text NOT NULL,
	"provider_account_id" text NOT NULL,
	"refresh_token" text,
	"access_token" text,
	"expires_at" integer,
	"token_type" text,
	"scope" text,
	"id_token" text,
	"session_state" text,
	CONSTRAINT "accounts_provider_provider_account_id_pk" PRIMARY KEY("provider","provider_account_id")
);
--> statement-breakpoint
CREATE TABLE "rate_limits" (
	"key" varchar(255) PRIMARY KEY NOT NULL,
	"points" integer DEFAULT 0 NOT NULL,
	"expire" bigint
);
--> statement-breakpoint
CREATE TABLE "sessions" (
	"session_token" text PRIMARY KEY NOT NULL,
	"user_id" uuid NOT NULL,
	"expires" timestamp with time zone NOT NULL
);
--> statement-breakpoint
CREATE TABLE "users" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"name" text,
	"email" text NOT NULL,
	"email_verified" timestamp with time zone,
	"image" text,
	"role" "role" DEFAULT 'volunteer' NOT NULL,
	"status" "user_status" DEFAULT 'active' NOT NULL,
	"password_hash" text,
	"failed_sign_ins" integer DEFAULT 0 NOT NULL,
	"locked_until" timestamp with time zone,
	"session_epoch" integer DEFAULT 0 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "users_email_unique" UNIQUE("email")
);
--> statement-breakpoint
CREATE TABLE "verification_tokens" (
	"identifier" text NOT NULL,
	"token" text NOT NULL,
	"expires" timestamp with time zone NOT NULL,
	CONSTRAINT "verification_tokens_identifier_token_pk" PRIMARY KEY("identifier","token")
);
--> statement-breakpoint
CREATE TABLE "site_stewards" (
	"site_id" uuid NOT NULL,
	"user_id" uuid NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "site_stewards_site_id_user_id_pk" PRIMARY KEY("site_id","user_id")
);
--> statement-breakpoint
CREATE TABLE "sites" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"slug" text NOT NULL,
	"name" text NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	"boundary" jsonb NOT NULL,
	"time_zone" text NOT NULL,
	"target_mag" real DEFAULT 21.5 NOT NULL,
	"natural_sky_mag" real DEFAULT 22 NOT NULL,
	"is_public" boolean DEFAULT false NOT NULL,
	"round_public_positions" boolean DEFAULT true NOT NULL,
	"lighting_zone" "lighting_zone",
	"sun_max_alt_deg" real DEFAULT -18 NOT NULL,
	"moon_max_alt_deg" real DEFAULT 0 NOT NULL,
	"cloud_window_min" real DEFAULT 15 NOT NULL,
	"cloud_spread_mag" real DEFAULT 0.25 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "sites_slug_unique" UNIQUE("slug")
);
--> statement-breakpoint
CREATE TABLE "calibrations" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"station_id" uuid NOT NULL,
	"effective_from" date NOT NULL,
	"offset_mag" real NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "station_tokens" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"station_id" uuid NOT NULL,
	"name" text NOT NULL,
	"prefix" text NOT NULL,
	"token_hash" text NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"last_used_at" timestamp with time zone,
	"revoked_at" timestamp with time zone,
	CONSTRAINT "station_tokens_token_hash_unique" UNIQUE("token_hash")
);
--> statement-breakpoint
CREATE TABLE "stations" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"slug" text NOT NULL,
	"name" text NOT NULL,
	"site_id" uuid,
	"owner_id" uuid NOT NULL,
	"lat" double precision NOT NULL,
	"lon" double precision NOT NULL,
	"elevation_m" real,
	"time_zone" text NOT NULL,
	"status" "station_status" DEFAULT 'active' NOT NULL,
	"approval" "station_approval" DEFAULT 'none' NOT NULL,
	"device_description" text DEFAULT '' NOT NULL,
	"field_of_view_deg" real,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"retired_at" timestamp with time zone,
	CONSTRAINT "stations_slug_unique" UNIQUE("slug")
);
--> statement-breakpoint
CREATE TABLE "dirty_nights" (
	"station_id" uuid NOT NULL,
	"night" date NOT NULL,
	"marked_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "dirty_nights_station_id_night_pk" PRIMARY KEY("station_id","night")
);
--> statement-breakpoint
CREATE TABLE "night_summaries" (
	"station_id" uuid NOT NULL,
	"night" date NOT NULL,
	"readings" integer NOT NULL,
	"usable_readings" integer NOT NULL,
	"median_mag" real,
	"darkest_sustained_mag" real,
	"spread_mag" real,
	"usable_hours" real DEFAULT 0 NOT NULL,
	"calibration_offset_mag" real DEFAULT 0 NOT NULL,
	"flag_counts" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"first_at" timestamp with time zone,
	"last_at" timestamp with time zone,
	"computed_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "night_summaries_station_id_night_pk" PRIMARY KEY("station_id","night")
);
--> statement-breakpoint
CREATE TABLE "readings" (
	"station_id" uuid NOT NULL,
	"taken_at" timestamp with time zone NOT NULL,
	"mag" real NOT NULL,
	"temp_c" real,
	"sun_alt_deg" real NOT NULL,
	"moon_alt_deg" real NOT NULL,
	"moon_fraction" real NOT NULL,
	"flags" smallint DEFAULT 0 NOT NULL,
	"source" "reading_source" NOT NULL,
	"upload_id" uuid,
	CONSTRAINT "readings_station_id_taken_at_pk" PRIMARY KEY("station_id","taken_at")
) PARTITION BY RANGE ("taken_at");
--> statement-breakpoint
CREATE TABLE "readings_y2010" PARTITION OF "readings" FOR VALUES FROM ('2010-01-01 00:00:00+00') TO ('2011-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2011" PARTITION OF "readings" FOR VALUES FROM ('2011-01-01 00:00:00+00') TO ('2012-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2012" PARTITION OF "readings" FOR VALUES FROM ('2012-01-01 00:00:00+00') TO ('2013-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2013" PARTITION OF "readings" FOR VALUES FROM ('2013-01-01 00:00:00+00') TO ('2014-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2014" PARTITION OF "readings" FOR VALUES FROM ('2014-01-01 00:00:00+00') TO ('2015-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2015" PARTITION OF "readings" FOR VALUES FROM ('2015-01-01 00:00:00+00') TO ('2016-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2016" PARTITION OF "readings" FOR VALUES FROM ('2016-01-01 00:00:00+00') TO ('2017-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2017" PARTITION OF "readings" FOR VALUES FROM ('2017-01-01 00:00:00+00') TO ('2018-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2018" PARTITION OF "readings" FOR VALUES FROM ('2018-01-01 00:00:00+00') TO ('2019-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2019" PARTITION OF "readings" FOR VALUES FROM ('2019-01-01 00:00:00+00') TO ('2020-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2020" PARTITION OF "readings" FOR VALUES FROM ('2020-01-01 00:00:00+00') TO ('2021-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2021" PARTITION OF "readings" FOR VALUES FROM ('2021-01-01 00:00:00+00') TO ('2022-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2022" PARTITION OF "readings" FOR VALUES FROM ('2022-01-01 00:00:00+00') TO ('2023-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2023" PARTITION OF "readings" FOR VALUES FROM ('2023-01-01 00:00:00+00') TO ('2024-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2024" PARTITION OF "readings" FOR VALUES FROM ('2024-01-01 00:00:00+00') TO ('2025-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2025" PARTITION OF "readings" FOR VALUES FROM ('2025-01-01 00:00:00+00') TO ('2026-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2026" PARTITION OF "readings" FOR VALUES FROM ('2026-01-01 00:00:00+00') TO ('2027-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2027" PARTITION OF "readings" FOR VALUES FROM ('2027-01-01 00:00:00+00') TO ('2028-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2028" PARTITION OF "readings" FOR VALUES FROM ('2028-01-01 00:00:00+00') TO ('2029-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2029" PARTITION OF "readings" FOR VALUES FROM ('2029-01-01 00:00:00+00') TO ('2030-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2030" PARTITION OF "readings" FOR VALUES FROM ('2030-01-01 00:00:00+00') TO ('2031-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2031" PARTITION OF "readings" FOR VALUES FROM ('2031-01-01 00:00:00+00') TO ('2032-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2032" PARTITION OF "readings" FOR VALUES FROM ('2032-01-01 00:00:00+00') TO ('2033-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2033" PARTITION OF "readings" FOR VALUES FROM ('2033-01-01 00:00:00+00') TO ('2034-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2034" PARTITION OF "readings" FOR VALUES FROM ('2034-01-01 00:00:00+00') TO ('2035-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_y2035" PARTITION OF "readings" FOR VALUES FROM ('2035-01-01 00:00:00+00') TO ('2036-01-01 00:00:00+00');
--> statement-breakpoint
CREATE TABLE "readings_default" PARTITION OF "readings" DEFAULT;
--> statement-breakpoint
CREATE TABLE "survey_points" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"survey_id" uuid NOT NULL,
	"lat" double precision NOT NULL,
	"lon" double precision NOT NULL,
	"taken_at" timestamp with time zone NOT NULL,
	"values" real[] NOT NULL,
	"median_mag" real NOT NULL,
	"spread_mag" real NOT NULL,
	"sun_alt_deg" real NOT NULL,
	"moon_alt_deg" real NOT NULL,
	"moon_fraction" real NOT NULL,
	"flags" smallint DEFAULT 0 NOT NULL,
	"conditions" text DEFAULT '' NOT NULL,
	"notes" text DEFAULT '' NOT NULL
);
--> statement-breakpoint
CREATE TABLE "surveys" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"user_id" uuid NOT NULL,
	"title" text NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "uploads" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"station_id" uuid NOT NULL,
	"uploaded_by" uuid,
	"filename" text NOT NULL,
	"size_bytes" bigint NOT NULL,
	"sha256" text NOT NULL,
	"object_key" text NOT NULL,
	"status" "upload_status" DEFAULT 'stored' NOT NULL,
	"mapping" jsonb,
	"metadata" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"rows_read" integer DEFAULT 0 NOT NULL,
	"accepted" integer DEFAULT 0 NOT NULL,
	"duplicates" integer DEFAULT 0 NOT NULL,
	"rejected_count" integer DEFAULT 0 NOT NULL,
	"rejections" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"bytes_processed" bigint DEFAULT 0 NOT NULL,
	"error" text,
	"attempts" integer DEFAULT 0 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "audit_log" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	"actor_id" uuid,
	"action" text NOT NULL,
	"entity_type" text NOT NULL,
	"entity_id" text NOT NULL,
	"before" jsonb,
	"after" jsonb
);
--> statement-breakpoint
ALTER TABLE "accounts" ADD CONSTRAINT "accounts_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sessions" ADD CONSTRAINT "sessions_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "site_stewards" ADD CONSTRAINT "site_stewards_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "site_stewards" ADD CONSTRAINT "site_stewards_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "calibrations" ADD CONSTRAINT "calibrations_station_id_stations_id_fk" FOREIGN KEY ("station_id") REFERENCES "public"."stations"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "calibrations" ADD CONSTRAINT "calibrations_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "station_tokens" ADD CONSTRAINT "station_tokens_station_id_stations_id_fk" FOREIGN KEY ("station_id") REFERENCES "public"."stations"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "station_tokens" ADD CONSTRAINT "station_tokens_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "stations" ADD CONSTRAINT "stations_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "stations" ADD CONSTRAINT "stations_owner_id_users_id_fk" FOREIGN KEY ("owner_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "night_summaries" ADD CONSTRAINT "night_summaries_station_id_stations_id_fk" FOREIGN KEY ("station_id") REFERENCES "public"."stations"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "survey_points" ADD CONSTRAINT "survey_points_survey_id_surveys_id_fk" FOREIGN KEY ("survey_id") REFERENCES "public"."surveys"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "surveys" ADD CONSTRAINT "surveys_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_station_id_stations_id_fk" FOREIGN KEY ("station_id") REFERENCES "public"."stations"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "audit_log" ADD CONSTRAINT "audit_log_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "calibrations_station_from_idx" ON "calibrations" USING btree ("station_id","effective_from");--> statement-breakpoint
CREATE INDEX "station_tokens_station_idx" ON "station_tokens" USING btree ("station_id");--> statement-breakpoint
CREATE INDEX "stations_site_idx" ON "stations" USING btree ("site_id");--> statement-breakpoint
CREATE INDEX "stations_owner_idx" ON "stations" USING btree ("owner_id");--> statement-breakpoint
CREATE INDEX "night_summaries_night_idx" ON "night_summaries" USING btree ("night");--> statement-breakpoint
CREATE INDEX "survey_points_survey_idx" ON "survey_points" USING btree ("survey_id");--> statement-breakpoint
CREATE UNIQUE INDEX "uploads_station_sha_idx" ON "uploads" USING btree ("station_id","sha256");--> statement-breakpoint
CREATE INDEX "audit_log_at_idx" ON "audit_log" USING btree ("at");--> statement-breakpoint
CREATE INDEX "audit_log_entity_idx" ON "audit_log" USING btree ("entity_type","entity_id");