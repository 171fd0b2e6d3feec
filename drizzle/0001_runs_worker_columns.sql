ALTER TABLE "runs" ALTER COLUMN "result" SET DATA TYPE json;--> statement-breakpoint
ALTER TABLE "runs" ADD COLUMN "heartbeat_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "runs" ADD COLUMN "worker_id" text;--> statement-breakpoint
ALTER TABLE "sweeps" ADD COLUMN "name" text;--> statement-breakpoint
CREATE INDEX "runs_network_version" ON "runs" USING btree ("network_version_id");--> statement-breakpoint
CREATE INDEX "runs_unfinished" ON "runs" USING btree ("created_at") WHERE status in ('queued', 'running');--> statement-breakpoint
CREATE INDEX "sweeps_network_version" ON "sweeps" USING btree ("network_version_id");