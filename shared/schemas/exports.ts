// CSV downloads of a study's trait table: an import template from the codebook, the table in a
// wide or a tidy long form, and the codebook as its companion file.
import { z } from "zod";

export const EXPORT_FORMS = ["wide", "long"] as const;

export const taxaExportQuerySchema = z.object({
  form: z
    .enum(EXPORT_FORMS, { message: "form must be wide or long" })
    .default("wide")
    .meta({ description: "wide: one row per taxon, one column per trait; long: one row per taxon and trait (tidy)" }),
  includeRetired: z
    .enum(["true", "false"], { message: "includeRetired must be true or false" })
    .default("false")
    .transform((v) => v === "true")
    .meta({ description: "Also export the values of retired traits" }),
});
export type TaxaExportQuery = z.output<typeof taxaExportQuerySchema>;

export const csvFileSchema = z
  .string()
  .meta({ id: "CsvFile", description: "UTF-8 CSV, comma separated, header row first; text cells that start with = + - @ tab or CR are prefixed with '" });

/** Header names the template and the wide export use for the taxon columns. */
export const TAXON_CSV_COLUMNS = {
  name: "name",
  higherTaxon: "higher_taxon",
  firstAppearance: "first_appearance",
  lastAppearance: "last_appearance",
  notes: "notes",
} as const;
