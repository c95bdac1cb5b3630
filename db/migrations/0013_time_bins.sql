CREATE TABLE "time_bins" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"study_id" uuid NOT NULL,
	"position" integer NOT NULL,
	"name" text NOT NULL,
	"base_ma" double precision NOT NULL,
	"top_ma" double precision NOT NULL,
	"chart_unit" text,
	"updated_by" uuid,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "time_bins_study_position_unique" UNIQUE("study_id","position")
);
--> statement-breakpoint
ALTER TABLE "time_bins" ADD CONSTRAINT "time_bins_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "time_bins" ADD CONSTRAINT "time_bins_updated_by_users_id_fk" FOREIGN KEY ("updated_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;