DROP INDEX "taxa_values_gin";--> statement-breakpoint
DROP INDEX "taxa_name_trgm";--> statement-breakpoint
DROP INDEX "taxa_higher_trgm";