-- Edited by hand: telemetry_samples is range-partitioned by month on ts
-- (drizzle-kit cannot express partitioning). Partitions: db/partitions.ts.
CREATE TYPE "public"."magnet_material" AS ENUM('ndfeb', 'smco', 'ferrite');--> statement-breakpoint
CREATE TYPE "public"."unit_kind" AS ENUM('wind', 'hydro');--> statement-breakpoint
CREATE TYPE "public"."presence_state" AS ENUM('online', 'offline');--> statement-breakpoint
CREATE TYPE "public"."severity" AS ENUM('info', 'warning', 'alarm');--> statement-breakpoint
CREATE TYPE "public"."verdict" AS ENUM('healthy', 'demagnetised', 'shorted-turns', 'speed-sensor-fault', 'insufficient-data');--> statement-breakpoint
CREATE TYPE "public"."alert_state" AS ENUM('open', 'acknowledged', 'resolved');--> statement-breakpoint
CREATE TABLE "sites" (
	"id" text PRIMARY KEY NOT NULL,
	"name" text NOT NULL,
	"timezone" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "units" (
	"key" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "units_key_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"id" text NOT NULL,
	"site_id" text NOT NULL,
	"name" text,
	"kind" "unit_kind" NOT NULL,
	"rated_kw" double precision NOT NULL,
	"rated_rpm" double precision NOT NULL,
	"max_rpm" double precision NOT NULL,
	"poles" integer NOT NULL,
	"ke_v_per_krpm" double precision NOT NULL,
	"ke_ref_c" double precision DEFAULT 20 NOT NULL,
	"magnet" "magnet_material" NOT NULL,
	"magnet_temp_coeff_pct_per_c" double precision,
	"phase_ohm" double precision NOT NULL,
	"phase_mh" double precision DEFAULT 0 NOT NULL,
	"power_curve" jsonb,
	"cut_in_ms" double precision,
	"cut_out_ms" double precision,
	"rotor_diameter_m" double precision,
	"design_head_m" double precision,
	"design_flow_m3s" double precision,
	"efficiency" double precision,
	"diagnosis" jsonb,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "units_id_unique" UNIQUE("id"),
	CONSTRAINT "units_poles_even" CHECK ("units"."poles" > 0 and "units"."poles" % 2 = 0)
);
--> statement-breakpoint
CREATE TABLE "quarantine" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "quarantine_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"received_at" timestamp with time zone DEFAULT now() NOT NULL,
	"topic" text NOT NULL,
	"site_id" text,
	"unit_id" text,
	"sample_index" integer,
	"payload" text NOT NULL,
	"payload_bytes" integer NOT NULL,
	"reason" text NOT NULL
);
--> statement-breakpoint
CREATE TABLE "telemetry_rollups_10m" (
	"unit_key" integer NOT NULL,
	"bucket_start" timestamp with time zone NOT NULL,
	"samples" integer NOT NULL,
	"first_ts" timestamp (3) with time zone NOT NULL,
	"last_ts" timestamp (3) with time zone NOT NULL,
	"covered_s" double precision DEFAULT 0 NOT NULL,
	"kwh" double precision DEFAULT 0 NOT NULL,
	"rpm_min" real,
	"rpm_max" real,
	"rpm_sum" double precision,
	"vll_min" real,
	"vll_max" real,
	"vll_sum" double precision,
	"amps_min" real,
	"amps_max" real,
	"amps_sum" double precision,
	"amps_count" integer DEFAULT 0 NOT NULL,
	"kw_min" real,
	"kw_max" real,
	"kw_sum" double precision,
	"kw_count" integer DEFAULT 0 NOT NULL,
	"stator_c_min" real,
	"stator_c_max" real,
	"stator_c_sum" double precision,
	"stator_c_count" integer DEFAULT 0 NOT NULL,
	"resource_min" real,
	"resource_max" real,
	"resource_sum" double precision,
	"resource_count" integer DEFAULT 0 NOT NULL,
	CONSTRAINT "telemetry_rollups_10m_unit_key_bucket_start_pk" PRIMARY KEY("unit_key","bucket_start")
);
--> statement-breakpoint
CREATE TABLE "telemetry_rollups_daily" (
	"unit_key" integer NOT NULL,
	"bucket_start" timestamp with time zone NOT NULL,
	"samples" integer NOT NULL,
	"first_ts" timestamp (3) with time zone NOT NULL,
	"last_ts" timestamp (3) with time zone NOT NULL,
	"covered_s" double precision DEFAULT 0 NOT NULL,
	"kwh" double precision DEFAULT 0 NOT NULL,
	"rpm_min" real,
	"rpm_max" real,
	"rpm_sum" double precision,
	"vll_min" real,
	"vll_max" real,
	"vll_sum" double precision,
	"amps_min" real,
	"amps_max" real,
	"amps_sum" double precision,
	"amps_count" integer DEFAULT 0 NOT NULL,
	"kw_min" real,
	"kw_max" real,
	"kw_sum" double precision,
	"kw_count" integer DEFAULT 0 NOT NULL,
	"stator_c_min" real,
	"stator_c_max" real,
	"stator_c_sum" double precision,
	"stator_c_count" integer DEFAULT 0 NOT NULL,
	"resource_min" real,
	"resource_max" real,
	"resource_sum" double precision,
	"resource_count" integer DEFAULT 0 NOT NULL,
	CONSTRAINT "telemetry_rollups_daily_unit_key_bucket_start_pk" PRIMARY KEY("unit_key","bucket_start")
);
--> statement-breakpoint
CREATE TABLE "telemetry_samples" (
	"unit_key" integer NOT NULL,
	"ts" timestamp (3) with time zone NOT NULL,
	"rpm" real NOT NULL,
	"hz" real,
	"vab" real NOT NULL,
	"vbc" real,
	"vca" real,
	"ia" real,
	"ib" real,
	"ic" real,
	"kw" real,
	"stator_c" real,
	"ambient_c" real,
	"wind_ms" real,
	"air_kg_m3" real,
	"flow_m3s" real,
	"head_m" real,
	CONSTRAINT "telemetry_samples_unit_key_ts_pk" PRIMARY KEY("unit_key","ts")
) PARTITION BY RANGE ("ts");
--> statement-breakpoint
CREATE TABLE "unit_status" (
	"unit_key" integer PRIMARY KEY NOT NULL,
	"presence" "presence_state",
	"presence_at" timestamp with time zone,
	"last_sample_ts" timestamp (3) with time zone,
	"last_received_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "unit_health" (
	"unit_key" integer PRIMARY KEY NOT NULL,
	"diagnosed_at" timestamp with time zone NOT NULL,
	"window_from" timestamp with time zone NOT NULL,
	"window_to" timestamp with time zone NOT NULL,
	"verdict" "verdict" NOT NULL,
	"samples_used" integer NOT NULL,
	"ke_ratio" double precision,
	"ke_ratio_low" double precision,
	"ke_ratio_high" double precision,
	"unbalance_pct" double precision,
	"speed_ratio" double precision,
	"findings" jsonb NOT NULL,
	"detail" jsonb NOT NULL,
	"trend" jsonb
);
--> statement-breakpoint
CREATE TABLE "unit_health_history" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "unit_health_history_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"unit_key" integer NOT NULL,
	"diagnosed_at" timestamp with time zone NOT NULL,
	"window_from" timestamp with time zone NOT NULL,
	"window_to" timestamp with time zone NOT NULL,
	"verdict" "verdict" NOT NULL,
	"samples_used" integer NOT NULL,
	"ke_ratio" double precision,
	"ke_ratio_low" double precision,
	"ke_ratio_high" double precision,
	"unbalance_pct" double precision,
	"speed_ratio" double precision,
	"findings" jsonb NOT NULL,
	"detail" jsonb NOT NULL
);
--> statement-breakpoint
CREATE TABLE "alert_events" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "alert_events_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"alert_id" bigint NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	"from_state" "alert_state",
	"to_state" "alert_state" NOT NULL,
	"note" text
);
--> statement-breakpoint
CREATE TABLE "alerts" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "alerts_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"unit_key" integer NOT NULL,
	"code" text NOT NULL,
	"severity" "severity" NOT NULL,
	"state" "alert_state" DEFAULT 'open' NOT NULL,
	"message" text NOT NULL,
	"detail" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"opened_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"resolved_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "units" ADD CONSTRAINT "units_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "telemetry_rollups_10m" ADD CONSTRAINT "telemetry_rollups_10m_unit_key_units_key_fk" FOREIGN KEY ("unit_key") REFERENCES "public"."units"("key") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "telemetry_rollups_daily" ADD CONSTRAINT "telemetry_rollups_daily_unit_key_units_key_fk" FOREIGN KEY ("unit_key") REFERENCES "public"."units"("key") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "unit_status" ADD CONSTRAINT "unit_status_unit_key_units_key_fk" FOREIGN KEY ("unit_key") REFERENCES "public"."units"("key") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "unit_health" ADD CONSTRAINT "unit_health_unit_key_units_key_fk" FOREIGN KEY ("unit_key") REFERENCES "public"."units"("key") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "unit_health_history" ADD CONSTRAINT "unit_health_history_unit_key_units_key_fk" FOREIGN KEY ("unit_key") REFERENCES "public"."units"("key") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alert_events" ADD CONSTRAINT "alert_events_alert_id_alerts_id_fk" FOREIGN KEY ("alert_id") REFERENCES "public"."alerts"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "alerts" ADD CONSTRAINT "alerts_unit_key_units_key_fk" FOREIGN KEY ("unit_key") REFERENCES "public"."units"("key") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "units_site_id_idx" ON "units" USING btree ("site_id");--> statement-breakpoint
CREATE INDEX "quarantine_received_at_idx" ON "quarantine" USING btree ("received_at");--> statement-breakpoint
CREATE INDEX "quarantine_unit_idx" ON "quarantine" USING btree ("site_id","unit_id");--> statement-breakpoint
CREATE INDEX "telemetry_samples_ts_brin" ON "telemetry_samples" USING brin ("ts");--> statement-breakpoint
CREATE INDEX "unit_health_history_unit_idx" ON "unit_health_history" USING btree ("unit_key","diagnosed_at");--> statement-breakpoint
CREATE INDEX "alert_events_alert_idx" ON "alert_events" USING btree ("alert_id","at");--> statement-breakpoint
CREATE INDEX "alerts_unit_state_idx" ON "alerts" USING btree ("unit_key","state");--> statement-breakpoint
CREATE INDEX "alerts_opened_at_idx" ON "alerts" USING btree ("opened_at");