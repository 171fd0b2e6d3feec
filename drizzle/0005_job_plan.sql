ALTER TABLE "runs" ADD COLUMN "plan" "plan_name";--> statement-breakpoint
ALTER TABLE "fits" ADD COLUMN "plan" "plan_name";