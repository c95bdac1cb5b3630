CREATE TABLE "timescale_units" (
	"version" text NOT NULL,
	"name" text NOT NULL,
	"label" text NOT NULL,
	"rank" text NOT NULL,
	"parent" text,
	"base_ma" double precision NOT NULL,
	"top_ma" double precision NOT NULL,
	"uncertainty_ma" double precision,
	"gssp_ratified" boolean NOT NULL,
	"source" text NOT NULL,
	"sort_order" integer NOT NULL,
	CONSTRAINT "timescale_units_version_rank_name_pk" PRIMARY KEY("version","rank","name")
);
