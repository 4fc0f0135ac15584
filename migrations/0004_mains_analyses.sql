ALTER TYPE "public"."analysis_kind" ADD VALUE 'mains-sweep';--> statement-breakpoint
ALTER TYPE "public"."analysis_kind" ADD VALUE 'mains-cold-hot';