DROP INDEX "taxa_study_higher_idx";--> statement-breakpoint
DROP INDEX "taxa_study_lad_idx";