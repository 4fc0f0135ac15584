CREATE TYPE "public"."job_state" AS ENUM('queued', 'running', 'done', 'cancelled', 'failed');--> statement-breakpoint
CREATE TABLE "analysis_jobs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"team_id" uuid NOT NULL,
	"revision_id" uuid NOT NULL,
	"kind" "analysis_kind" NOT NULL,
	"options" jsonb NOT NULL,
	"options_hash" text NOT NULL,
	"requested_by" uuid,
	"audit" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"state" "job_state" DEFAULT 'queued' NOT NULL,
	"done" integer DEFAULT 0 NOT NULL,
	"total" integer NOT NULL,
	"cancel_requested" boolean DEFAULT false NOT NULL,
	"worker" text,
	"attempts" integer DEFAULT 0 NOT NULL,
	"run_id" uuid,
	"error" jsonb,
	"created_at" timestamp (3) with time zone DEFAULT now() NOT NULL,
	"started_at" timestamp (3) with time zone,
	"heartbeat_at" timestamp (3) with time zone,
	"ended_at" timestamp (3) with time zone
);
--> statement-breakpoint
ALTER TABLE "analysis_jobs" ADD CONSTRAINT "analysis_jobs_team_id_teams_id_fk" FOREIGN KEY ("team_id") REFERENCES "public"."teams"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "analysis_jobs" ADD CONSTRAINT "analysis_jobs_revision_id_revisions_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."revisions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "analysis_jobs" ADD CONSTRAINT "analysis_jobs_requested_by_users_id_fk" FOREIGN KEY ("requested_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "analysis_jobs" ADD CONSTRAINT "analysis_jobs_run_id_analysis_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."analysis_runs"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "analysis_jobs_queue_idx" ON "analysis_jobs" USING btree ("state","created_at");--> statement-breakpoint
CREATE UNIQUE INDEX "analysis_jobs_active_unique" ON "analysis_jobs" USING btree ("revision_id","kind","options_hash") WHERE state in ('queued', 'running');