// A saved comparison as CSV. One file holds every table, each row naming its table in the first
// column (the columns are the union of the tables'); `table` chooses one table with its own columns.
// Text cells are neutralised against formula injection by the shared CSV writer.
import { csvRow } from "../../shared/csv/write";
import { formatMa } from "../../shared/format/ages";
import { IUCN_SOURCE } from "../../shared/iucn";
import { COMPARISON_EXPORT_TABLES, type Comparison, type ComparisonExportTable } from "../../shared/schemas/comparisons";

type Cell = string | number | boolean | null | undefined;
type Row = Record<string, Cell>;

const COLUMNS: Record<ComparisonExportTable, string[]> = {
  comparison: ["field", "value"],
  species: ["name", "higher_taxon", "category", "group", "probability", "ci_low", "ci_high", "not_scored_because"],
  traits: [
    "trait_key",
    "trait_label",
    "contrast",
    "state",
    "reference",
    "today_or",
    "today_ci_low",
    "today_ci_high",
    "today_method",
    "today_n",
    "today_note",
    "past_crude_or",
    "past_crude_ci_low",
    "past_crude_ci_high",
    "past_model_adjusted_or",
    "past_model_adjusted_ci_low",
    "past_model_adjusted_ci_high",
  ],
  worth_a_look: ["rank", "name", "higher_taxon", "category", "probability", "ci_low", "ci_high"],
  roc: ["false_positive_rate", "true_positive_rate", "threshold"],
};

function comparisonRows(c: Comparison): Row[] {
  const r = c.results;
  const rows: Array<[string, Cell]> = [
    ["name", c.name],
    ["comparison_id", c.id],
    ["data_hash_sha256", c.dataHash],
    ["app_version", c.appVersion],
    ["created_by", c.createdBy?.name ?? null],
    ["created_at", c.createdAt],
    ["run", `${r.run.name} (${r.run.id})`],
    ["run_data_hash_sha256", r.run.dataHash],
    ["boundary", `${r.run.boundaryLabel} (${formatMa(r.run.boundaryMa)})`],
    ["model", `${r.run.modelMethod}; ${r.run.modelN} taxa`],
    ["list", `${r.list.name} (${r.list.id})`],
    ["categories_source", IUCN_SOURCE],
    ...r.crosswalkLabels.map((p, i): [string, Cell] => [`crosswalk_${i + 1}`, `${p.column} -> ${p.traitLabel} (${p.traitKey})`]),
    ["level", c.params.level],
    ["worth_a_look_min", c.params.worthALookMin],
    ["species", r.counts.species],
    ["threatened_cr_en_vu", r.counts.threatened],
    ["not_threatened_nt_lc", r.counts.notThreatened],
    ["excluded_ex", r.counts.excluded.EX],
    ["excluded_ew", r.counts.excluded.EW],
    ["excluded_dd", r.counts.excluded.DD],
    ["excluded_ne", r.counts.excluded.NE],
    ["scored_threatened", r.counts.scored.threatened],
    ["scored_not_threatened", r.counts.scored.notThreatened],
    ["not_scored", r.counts.unscored.threatened + r.counts.unscored.notThreatened + r.counts.unscored.excluded],
    ["auc", r.roc?.auc ?? null],
    ["auc_se", r.roc?.se ?? null],
    ["auc_se_method", r.roc ? (r.roc.seMethod === "score-interval" ? "half the score interval's width over z (DeLong's collapses at 0 or 1)" : "DeLong") : null],
    ["auc_ci_low", r.roc?.ci[0] ?? null],
    ["auc_ci_high", r.roc?.ci[1] ?? null],
    ["auc_ci_method", r.roc ? (r.roc.ciMethod ?? "DeLong, auc +- z se") : null],
    ["auc_verdict", r.roc?.verdict ?? null],
    ["auc_small_sample", r.roc?.smallSample ?? null],
    ["auc_note", r.rocNote],
    ["spearman_rho", r.spearman?.rho ?? null],
    ["spearman_p", r.spearman?.pValue ?? null],
    ["spearman_p_method", r.spearman ? (r.spearman.method === "exact-permutation" ? "exact permutation" : "t approximation") : null],
    ["spearman_df", r.spearman?.df ?? null],
    ["spearman_n", r.spearman?.n ?? null],
    ["spearman_note", r.spearmanNote],
    ...r.unscoredReasons.map((u): [string, Cell] => ["not_scored_reason", `${u.count}: ${u.reason}`]),
    ...r.notes.map((n): [string, Cell] => ["note", n]),
    ...r.cautions.map((n): [string, Cell] => ["caution", n]),
  ];
  return rows.map(([field, value]) => ({ field, value }));
}

function tableRows(c: Comparison, table: ComparisonExportTable): Row[] {
  const r = c.results;
  switch (table) {
    case "comparison":
      return comparisonRows(c);
    case "species":
      return r.species.map((s) => ({
        name: s.name,
        higher_taxon: s.higherTaxon,
        category: s.category,
        group: s.group,
        probability: s.probability,
        ci_low: s.ci?.[0],
        ci_high: s.ci?.[1],
        not_scored_because: s.reason,
      }));
    case "traits":
      return r.traits.flatMap((t) =>
        t.contrasts.map((k) => ({
          trait_key: t.key,
          trait_label: t.label,
          contrast: k.contrast,
          state: k.state,
          reference: k.reference,
          today_or: k.today?.estimate,
          today_ci_low: k.today?.ci[0],
          today_ci_high: k.today?.ci[1],
          today_method: k.today?.method,
          today_n: k.today?.n,
          today_note: k.todayNote,
          past_crude_or: k.pastCrude?.estimate,
          past_crude_ci_low: k.pastCrude?.ci[0],
          past_crude_ci_high: k.pastCrude?.ci[1],
          past_model_adjusted_or: k.pastModelAdjusted?.estimate,
          past_model_adjusted_ci_low: k.pastModelAdjusted?.ci[0],
          past_model_adjusted_ci_high: k.pastModelAdjusted?.ci[1],
        })),
      );
    case "worth_a_look":
      return r.worthALook.map((s) => ({ rank: s.rank, name: s.name, higher_taxon: s.higherTaxon, category: s.category, probability: s.probability, ci_low: s.ci?.[0], ci_high: s.ci?.[1] }));
    case "roc":
      return (r.roc?.points ?? []).map((p) => ({ false_positive_rate: p.falsePositiveRate, true_positive_rate: p.truePositiveRate, threshold: p.threshold }));
  }
}

/** The CSV text: one table with its own columns, or all tables with a leading `table` column. */
export function comparisonCsv(c: Comparison, table?: ComparisonExportTable): string {
  if (table) {
    const columns = COLUMNS[table];
    return csvRow(columns) + tableRows(c, table).map((row) => csvRow(columns.map((k) => row[k]))).join("");
  }
  const columns = [...new Set(COMPARISON_EXPORT_TABLES.flatMap((t) => COLUMNS[t]))];
  let out = csvRow(["table", ...columns]);
  for (const t of COMPARISON_EXPORT_TABLES) for (const row of tableRows(c, t)) out += csvRow([t, ...columns.map((k) => row[k])]);
  return out;
}

/** "comparison-<name>-<id8>[-table].csv", safe for a Content-Disposition header. */
export function comparisonFileName(c: Comparison, format: "csv" | "json", table?: ComparisonExportTable): string {
  const slug = c.name.toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-|-$/g, "").slice(0, 40) || "comparison";
  return `comparison-${slug}-${c.id.slice(0, 8)}${table ? `-${table}` : ""}.${format}`;
}
