CREATE TABLE "mqtt_accounts" (
	"username" text PRIMARY KEY NOT NULL,
	"role" text NOT NULL,
	"unit_key" integer,
	"password_hash" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"rotated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"revoked_at" timestamp with time zone,
	CONSTRAINT "mqtt_accounts_unit_key_unique" UNIQUE("unit_key"),
	CONSTRAINT "mqtt_accounts_role_unit" CHECK (("mqtt_accounts"."role" = 'device') = ("mqtt_accounts"."unit_key" is not null)),
	CONSTRAINT "mqtt_accounts_role" CHECK ("mqtt_accounts"."role" in ('device', 'ingester'))
);
--> statement-breakpoint
ALTER TABLE "mqtt_accounts" ADD CONSTRAINT "mqtt_accounts_unit_key_units_key_fk" FOREIGN KEY ("unit_key") REFERENCES "public"."units"("key") ON DELETE no action ON UPDATE no action;