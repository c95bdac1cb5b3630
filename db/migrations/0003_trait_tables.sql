DROP INDEX "taxa_study_name_idx";--> statement-breakpoint
ALTER TABLE "imports" ADD COLUMN "progress" real DEFAULT 0 NOT NULL;--> statement-breakpoint
CREATE INDEX "decisions_reverts_idx" ON "coding_decisions" USING btree ("reverts_id");--> statement-breakpoint
CREATE INDEX "decisions_batch_idx" ON "coding_decisions" USING btree ("batch_id");--> statement-breakpoint
CREATE UNIQUE INDEX "taxa_study_live_name_idx" ON "taxa" USING btree ("study_id","name") WHERE deleted_at IS NULL;