CREATE TYPE "public"."meter_outbox_status" AS ENUM('pending', 'sent', 'failed');--> statement-breakpoint
CREATE TABLE "meter_outbox" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"ledger_id" uuid NOT NULL,
	"workspace_id" uuid NOT NULL,
	"compute_seconds" real NOT NULL,
	"usage_at" timestamp with time zone NOT NULL,
	"status" "meter_outbox_status" DEFAULT 'pending' NOT NULL,
	"attempts" integer DEFAULT 0 NOT NULL,
	"next_attempt_at" timestamp with time zone DEFAULT now() NOT NULL,
	"lease_until" timestamp with time zone,
	"last_error" text,
	"stripe_customer_id" text,
	"sent_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "meter_outbox_ledger_id_unique" UNIQUE("ledger_id")
);
--> statement-breakpoint
CREATE TABLE "spend_cap_notices" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"workspace_id" uuid NOT NULL,
	"period" text NOT NULL,
	"threshold_percent" integer NOT NULL,
	"spend_usd" real NOT NULL,
	"spend_cap_usd" real NOT NULL,
	"recipients" jsonb NOT NULL,
	"sent_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "stripe_events" (
	"id" text PRIMARY KEY NOT NULL,
	"type" text NOT NULL,
	"stripe_created_at" timestamp with time zone NOT NULL,
	"workspace_id" uuid,
	"outcome" text NOT NULL,
	"payload" jsonb NOT NULL,
	"received_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "workspace_billing" (
	"workspace_id" uuid PRIMARY KEY NOT NULL,
	"grace_ends_at" timestamp with time zone,
	"last_payment_failed_at" timestamp with time zone,
	"last_invoice_paid_at" timestamp with time zone,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "meter_outbox" ADD CONSTRAINT "meter_outbox_ledger_id_usage_ledger_id_fk" FOREIGN KEY ("ledger_id") REFERENCES "public"."usage_ledger"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "meter_outbox" ADD CONSTRAINT "meter_outbox_workspace_id_workspaces_id_fk" FOREIGN KEY ("workspace_id") REFERENCES "public"."workspaces"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spend_cap_notices" ADD CONSTRAINT "spend_cap_notices_workspace_id_workspaces_id_fk" FOREIGN KEY ("workspace_id") REFERENCES "public"."workspaces"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "stripe_events" ADD CONSTRAINT "stripe_events_workspace_id_workspaces_id_fk" FOREIGN KEY ("workspace_id") REFERENCES "public"."workspaces"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "workspace_billing" ADD CONSTRAINT "workspace_billing_workspace_id_workspaces_id_fk" FOREIGN KEY ("workspace_id") REFERENCES "public"."workspaces"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "meter_outbox_due" ON "meter_outbox" USING btree ("status","next_attempt_at");--> statement-breakpoint
CREATE INDEX "meter_outbox_workspace" ON "meter_outbox" USING btree ("workspace_id","status");--> statement-breakpoint
CREATE UNIQUE INDEX "spend_cap_notices_once" ON "spend_cap_notices" USING btree ("workspace_id","period","threshold_percent");--> statement-breakpoint
CREATE INDEX "stripe_events_workspace" ON "stripe_events" USING btree ("workspace_id","received_at");