CREATE TABLE "occurrences" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "occurrences_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"study_id" uuid NOT NULL,
	"upload_id" uuid NOT NULL,
	"source_row" integer NOT NULL,
	"taxon" text NOT NULL,
	"higher_taxon" text,
	"max_ma" double precision NOT NULL,
	"min_ma" double precision NOT NULL,
	"early_interval" text,
	"late_interval" text,
	"collection" text,
	"count" integer
);
--> statement-breakpoint
ALTER TABLE "occurrences" ADD CONSTRAINT "occurrences_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "occurrences" ADD CONSTRAINT "occurrences_upload_id_imports_id_fk" FOREIGN KEY ("upload_id") REFERENCES "public"."imports"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "occurrences_study_taxon_idx" ON "occurrences" USING btree ("study_id","taxon");--> statement-breakpoint
CREATE INDEX "occurrences_upload_idx" ON "occurrences" USING btree ("upload_id");