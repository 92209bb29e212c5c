DROP TABLE "alert_events" CASCADE;--> statement-breakpoint
DROP TABLE "alerts" CASCADE;--> statement-breakpoint
DROP TYPE "public"."alert_state";