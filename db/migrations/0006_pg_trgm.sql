-- Trigram matching, so the grid's "contains" filters on names and higher taxa can use an index.
CREATE EXTENSION IF NOT EXISTS pg_trgm;
