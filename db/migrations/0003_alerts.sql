CREATE TYPE "public"."alert_condition" AS ENUM('demagnetisation', 'shorted-turns', 'speed-sensor', 'ke-trend', 'overspeed', 'stator-temperature', 'offline', 'bad-telemetry', 'nameplate-suspect');--> statement-breakpoint
CREATE TYPE "public"."alert_event_type" AS ENUM('opened', 'acknowledged', 'cleared', 'reopened', 'shelved', 'unshelved', 'escalated');--> statement-breakpoint
CREATE TYPE "public"."unit_alert_state" AS ENUM('active', 'acknowledged', 'cleared', 'shelved');--> statement-breakpoint
CREATE TABLE "alert_condition_states" (
	"unit_key" integer NOT NULL,
	"condition" "alert_condition" NOT NULL,
	"holds_since" timestamp with time zone,
	"last_value" double precision,
	"evaluated_at" timestamp with time zone NOT NULL,
	CONSTRAINT "alert_condition_states_unit_key_condition_pk" PRIMARY KEY("unit_key","condition")
);
--> statement-breakpoint
CREATE TABLE "unit_alert_events" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "unit_alert_events_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"alert_id" bigint NOT NULL,
	"at" timestamp with time zone NOT NULL,
	"type" "alert_event_type" NOT NULL,
	"from_state" "unit_alert_state",
	"to_state" "unit_alert_state" NOT NULL,
	"actor" text NOT NULL,
	"note" text,
	"value" double precision
);
--> statement-breakpoint
CREATE TABLE "unit_alerts" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "unit_alerts_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"unit_key" integer NOT NULL,
	"condition" "alert_condition" NOT NULL,
	"severity" "severity" NOT NULL,
	"state" "unit_alert_state" NOT NULL,
	"message" text NOT NULL,
	"value" double precision,
	"limit_value" double precision,
	"detail" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"opened_at" timestamp with time zone NOT NULL,
	"changed_at" timestamp with time zone NOT NULL,
	"gone_since" timestamp with time zone,
	"acknowledged_at" timestamp with time zone,
	"acknowledged_by" text,
	"acknowledged_by_id" bigint,
	"acknowledge_note" text,
	"cleared_at" timestamp with time zone,
	"shelved_until" timestamp with time zone,
	"shelve_reason" text,
	"flaps" integer DEFAULT 0 NOT NULL,
	"flap_window_start" timestamp with time zone,
	"notifications_held" integer DEFAULT 0 NOT NULL,
	"escalation" integer DEFAULT 0 NOT NULL
);
--> statement-breakpoint
CREATE TABLE "webhook_attempts" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "webhook_attempts_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"delivery_id" bigint NOT NULL,
	"at" timestamp with time zone NOT NULL,
	"status" integer,
	"error" text,
	"duration_ms" integer NOT NULL
);
--> statement-breakpoint
CREATE TABLE "webhook_deliveries" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "webhook_deliveries_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"endpoint_id" bigint NOT NULL,
	"message_id" text NOT NULL,
	"type" text NOT NULL,
	"body" text NOT NULL,
	"created_at" timestamp with time zone NOT NULL,
	"attempts" integer DEFAULT 0 NOT NULL,
	"next_attempt_at" timestamp with time zone,
	"delivered_at" timestamp with time zone,
	"given_up_at" timestamp with time zone,
	"last_status" integer,
	"last_error" text
);
--> statement-breakpoint
CREATE TABLE "webhook_endpoints" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "webhook_endpoints_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"url" text NOT NULL,
	"site_id" text,
	"min_severity" "severity" DEFAULT 'warning' NOT NULL,
	"secret" text NOT NULL,
	"enabled" boolean DEFAULT true NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"created_by" text NOT NULL
);
--> statement-breakpoint
ALTER TABLE "alert_condition_states" ADD CONSTRAINT "alert_condition_states_unit_key_units_key_fk" FOREIGN KEY ("unit_key") REFERENCES "public"."units"("key") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "unit_alert_events" ADD CONSTRAINT "unit_alert_events_alert_id_unit_alerts_id_fk" FOREIGN KEY ("alert_id") REFERENCES "public"."unit_alerts"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "unit_alerts" ADD CONSTRAINT "unit_alerts_unit_key_units_key_fk" FOREIGN KEY ("unit_key") REFERENCES "public"."units"("key") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "unit_alerts" ADD CONSTRAINT "unit_alerts_acknowledged_by_id_people_id_fk" FOREIGN KEY ("acknowledged_by_id") REFERENCES "public"."people"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "webhook_attempts" ADD CONSTRAINT "webhook_attempts_delivery_id_webhook_deliveries_id_fk" FOREIGN KEY ("delivery_id") REFERENCES "public"."webhook_deliveries"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "webhook_deliveries" ADD CONSTRAINT "webhook_deliveries_endpoint_id_webhook_endpoints_id_fk" FOREIGN KEY ("endpoint_id") REFERENCES "public"."webhook_endpoints"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "webhook_endpoints" ADD CONSTRAINT "webhook_endpoints_site_id_sites_id_fk" FOREIGN KEY ("site_id") REFERENCES "public"."sites"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "unit_alert_events_alert_idx" ON "unit_alert_events" USING btree ("alert_id","at");--> statement-breakpoint
CREATE UNIQUE INDEX "unit_alerts_open_one" ON "unit_alerts" USING btree ("unit_key","condition") WHERE "unit_alerts"."cleared_at" is null;--> statement-breakpoint
CREATE INDEX "unit_alerts_changed_idx" ON "unit_alerts" USING btree ("changed_at");--> statement-breakpoint
CREATE INDEX "unit_alerts_unit_opened_idx" ON "unit_alerts" USING btree ("unit_key","opened_at");--> statement-breakpoint
CREATE INDEX "unit_alerts_state_idx" ON "unit_alerts" USING btree ("state","opened_at");--> statement-breakpoint
CREATE INDEX "webhook_attempts_delivery_idx" ON "webhook_attempts" USING btree ("delivery_id","at");--> statement-breakpoint
CREATE UNIQUE INDEX "webhook_deliveries_message_idx" ON "webhook_deliveries" USING btree ("endpoint_id","message_id");--> statement-breakpoint
CREATE INDEX "webhook_deliveries_due_idx" ON "webhook_deliveries" USING btree ("next_attempt_at");--> statement-breakpoint
-- Alerts of the first schema (states open, acknowledged, resolved) carried over to the contract's
-- (active, acknowledged, cleared); codes that are no contract condition stay behind with the old
-- table, which the next migration drops. One not-yet-cleared alert per unit and condition is kept.
INSERT INTO "unit_alerts" ("unit_key", "condition", "severity", "state", "message", "detail", "opened_at", "changed_at", "cleared_at")
SELECT a."unit_key", a."code"::"alert_condition", a."severity",
       (CASE a."state" WHEN 'open' THEN 'active' WHEN 'resolved' THEN 'cleared' ELSE 'acknowledged' END)::"unit_alert_state",
       a."message", a."detail", a."opened_at", a."updated_at",
       CASE WHEN a."state" = 'resolved' THEN coalesce(a."resolved_at", a."updated_at") END
FROM "alerts" a
WHERE a."code" IN ('demagnetisation', 'shorted-turns', 'speed-sensor', 'ke-trend', 'overspeed', 'stator-temperature', 'offline', 'bad-telemetry', 'nameplate-suspect')
ORDER BY a."opened_at"
ON CONFLICT ("unit_key", "condition") WHERE "cleared_at" IS NULL DO NOTHING;
