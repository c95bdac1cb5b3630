// A trait table template for someone without a study yet, written here in the browser (no request):
// the columns a new study's own template has, since every new study starts from the suggested
// codebook. The import wizard recognises each header by name.
import { SUGGESTED_CODEBOOK } from "@shared/codebook";
import { csvRow } from "@shared/csv/write";
import { TAXON_CSV_COLUMNS } from "@shared/schemas/exports";

export const TAXA_TEMPLATE_FILE_NAME = "stratasieve-taxa-template.csv";

/** The header row: the taxon's own columns, then one column per suggested trait, by key. */
export function suggestedTaxaTemplate(): string {
  return csvRow([
    TAXON_CSV_COLUMNS.name,
    TAXON_CSV_COLUMNS.higherTaxon,
    TAXON_CSV_COLUMNS.firstAppearance,
    TAXON_CSV_COLUMNS.lastAppearance,
    TAXON_CSV_COLUMNS.notes,
    ...SUGGESTED_CODEBOOK.map((t) => t.key),
  ]);
}

/** Saves the template through a temporary object URL. */
export function downloadSuggestedTaxaTemplate(): void {
  const url = URL.createObjectURL(new Blob([suggestedTaxaTemplate()], { type: "text/csv;charset=utf-8" }));
  const link = document.createElement("a");
  link.href = url;
  link.download = TAXA_TEMPLATE_FILE_NAME;
  document.body.append(link);
  link.click();
  link.remove();
  // Revoked after the click has handed the file to the browser.
  setTimeout(() => URL.revokeObjectURL(url), 0);
}
