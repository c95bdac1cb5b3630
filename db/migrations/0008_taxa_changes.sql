CREATE TABLE "taxa_changes" (
	"study_id" uuid NOT NULL,
	"taxon_id" uuid NOT NULL,
	"txid" bigint DEFAULT (pg_current_xact_id()::text)::bigint NOT NULL,
	"changed_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE INDEX "taxa_changes_study_txid_idx" ON "taxa_changes" USING btree ("study_id","txid");--> statement-breakpoint
CREATE INDEX "taxa_changes_changed_at_idx" ON "taxa_changes" USING btree ("changed_at");--> statement-breakpoint
-- Every statement that writes taxa logs the taxa it touched, in its own transaction.
CREATE FUNCTION "log_taxa_changes"() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  INSERT INTO "taxa_changes" ("study_id", "taxon_id") SELECT "study_id", "id" FROM "changed_rows";
  RETURN NULL;
END
$$;--> statement-breakpoint
CREATE TRIGGER "taxa_log_insert" AFTER INSERT ON "taxa" REFERENCING NEW TABLE AS "changed_rows" FOR EACH STATEMENT EXECUTE FUNCTION "log_taxa_changes"();--> statement-breakpoint
CREATE TRIGGER "taxa_log_update" AFTER UPDATE ON "taxa" REFERENCING NEW TABLE AS "changed_rows" FOR EACH STATEMENT EXECUTE FUNCTION "log_taxa_changes"();--> statement-breakpoint
CREATE TRIGGER "taxa_log_delete" AFTER DELETE ON "taxa" REFERENCING OLD TABLE AS "changed_rows" FOR EACH STATEMENT EXECUTE FUNCTION "log_taxa_changes"();
