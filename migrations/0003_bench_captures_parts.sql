CREATE TABLE "bench_captures" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"team_id" uuid NOT NULL,
	"design_id" uuid NOT NULL,
	"name" text NOT NULL,
	"file_name" text NOT NULL,
	"content_type" text NOT NULL,
	"byte_size" integer NOT NULL,
	"sha256" text NOT NULL,
	"stored_as" text NOT NULL,
	"mapping" jsonb NOT NULL,
	"rows" integer NOT NULL,
	"decimated" jsonb NOT NULL,
	"uploaded_by" uuid,
	"created_at" timestamp (3) with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "designs" ADD COLUMN "part_refs" jsonb DEFAULT '{}'::jsonb NOT NULL;--> statement-breakpoint
ALTER TABLE "bench_captures" ADD CONSTRAINT "bench_captures_team_id_teams_id_fk" FOREIGN KEY ("team_id") REFERENCES "public"."teams"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bench_captures" ADD CONSTRAINT "bench_captures_design_id_designs_id_fk" FOREIGN KEY ("design_id") REFERENCES "public"."designs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bench_captures" ADD CONSTRAINT "bench_captures_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "bench_captures_design_idx" ON "bench_captures" USING btree ("design_id","created_at");--> statement-breakpoint
CREATE INDEX "bench_captures_sha_idx" ON "bench_captures" USING btree ("sha256");