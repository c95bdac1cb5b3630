CREATE INDEX "taxa_name_trgm" ON "taxa" USING gin ("name" gin_trgm_ops);--> statement-breakpoint
CREATE INDEX "taxa_higher_trgm" ON "taxa" USING gin ("higher_taxon" gin_trgm_ops);