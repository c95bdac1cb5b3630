// A stored run as CSV. One file holds every table, each row naming its table in the first column
// (the columns are the union of the tables', empty where a table has no such column); `table`
// chooses one table with its own columns only. Text cells are neutralised against formula
// injection by the shared CSV writer.
import { csvRow } from "../../shared/csv/write";
import { CORRECTION_LABELS, RUN_EXPORT_TABLES, type Run, type RunExportTable } from "../../shared/schemas/runs";
import { CRISIS_COLUMNS, crisisRows, ROBUSTNESS_COLUMNS, robustnessRows } from "./runChecksExport";

type Cell = string | number | boolean | null | undefined;
type Record_ = Record<string, Cell>;

/** Columns of each table, in order; every table after "run" starts with the boundary columns. */
const BOUNDARY_COLUMNS = ["boundary_ma", "window_myr", "boundary_label"];
const COLUMNS: Record<RunExportTable, string[]> = {
  run: ["field", "value"],
  design: [...BOUNDARY_COLUMNS, "victims", "survivors", "not_at_risk", "overrides_applied", "complete_cases", "trait_key", "trait_label", "used", "dropped_missing"],
  states: [...BOUNDARY_COLUMNS, "trait_key", "trait_label", "state", "state_label", "victims", "survivors", "proportion", "ci_low", "ci_high"],
  tests: [...BOUNDARY_COLUMNS, "trait_key", "trait_label", "method", "statistic", "df", "p_value", "adjusted_p_value", "used", "dropped_missing", "confounding_note"],
  contrasts: [
    ...BOUNDARY_COLUMNS,
    "trait_key",
    "trait_label",
    "contrast",
    "state",
    "reference",
    "crude_or",
    "crude_ci_low",
    "crude_ci_high",
    "crude_method",
    "clade_adjusted_or",
    "clade_adjusted_ci_low",
    "clade_adjusted_ci_high",
    "clade_adjusted_method",
    "clade_informative_clades",
    "clade_adjusted_thin",
    "breslow_day_chi_square",
    "breslow_day_df",
    "breslow_day_p",
    "model_adjusted_or",
    "model_adjusted_ci_low",
    "model_adjusted_ci_high",
    "change_on_clade_adjustment",
    "change_on_model_adjustment",
    "clade_standardised_or",
    "clade_change_p",
    "model_standardised_or",
    "model_change_p",
    "flagged",
    "flag_decided_by",
  ],
  coefficients: [...BOUNDARY_COLUMNS, "term", "estimate", "se", "z", "p_value", "ci_low", "ci_high", "odds_ratio", "firth"],
  terms: [...BOUNDARY_COLUMNS, "term", "df", "chi_square", "p_value"],
  crisis: CRISIS_COLUMNS,
  robustness: ROBUSTNESS_COLUMNS,
  sampling: [
    ...BOUNDARY_COLUMNS,
    "covariates",
    "taxa_with_occurrences",
    "taxa_without_occurrences",
    "trait",
    "contrast",
    "or_without_sampling",
    "ci_low_without_sampling",
    "ci_high_without_sampling",
    "or_with_sampling",
    "ci_low_with_sampling",
    "ci_high_with_sampling",
    "verdict",
    "words",
    "note",
  ],
};

/** Each contrast's odds ratio without and with the sampling covariates, per boundary; a boundary without a comparison gives one row with its note. */
function samplingRows(run: Run): Record_[] {
  const out: Record_[] = [];
  for (const b of run.results?.boundaries ?? []) {
    const s = b.sampling;
    if (!s) continue;
    const common = { boundary_ma: b.boundaryMa, window_myr: b.windowMyr, boundary_label: b.label, covariates: s.covariates.join("; "), taxa_with_occurrences: s.taxa, taxa_without_occurrences: s.withoutOccurrences };
    if (s.contrasts.length === 0) out.push({ ...common, note: s.note });
    for (const c of s.contrasts) {
      out.push({
        ...common,
        trait: c.traitKey,
        contrast: c.contrast,
        or_without_sampling: c.withoutSampling?.estimate ?? null,
        ci_low_without_sampling: c.withoutSampling?.ci[0] ?? null,
        ci_high_without_sampling: c.withoutSampling?.ci[1] ?? null,
        or_with_sampling: c.withSampling?.estimate ?? null,
        ci_low_with_sampling: c.withSampling?.ci[0] ?? null,
        ci_high_with_sampling: c.withSampling?.ci[1] ?? null,
        verdict: c.verdict,
        words: c.words,
        note: s.note,
      });
    }
  }
  return out;
}

function runRows(run: Run): Record_[] {
  const p = run.params;
  const traitLabel = new Map((run.results?.traits ?? []).map((t) => [t.traitId, `${t.label} (${t.key})`]));
  const rows: Array<[string, Cell]> = [
    ["name", run.name],
    ["run_id", run.id],
    ["status", run.status],
    ["data_hash_sha256", run.dataHash],
    ["row_count", run.rowCount],
    ["app_version", run.appVersion],
    ["created_by", run.createdBy?.name ?? null],
    ["created_at", run.createdAt],
    ["finished_at", run.finishedAt],
    ...p.boundaries.map((b, i): [string, Cell] => {
      const used = run.results?.boundaries[i];
      return [`boundary_${i + 1}`, `${used?.label ?? `${b.boundaryMa} Ma`}; window ${used?.windowMyr ?? b.windowMyr ?? "default"} Myr`];
    }),
    ...p.traits.map((t, i): [string, Cell] => [
      `trait_${i + 1}`,
      [traitLabel.get(t.traitId) ?? t.traitId, t.reference ? `reference ${t.reference}` : null, t.transform ? `transform ${t.transform}` : null, t.standardise ? "standardised" : null]
        .filter(Boolean)
        .join("; "),
    ]),
    ["stratify_by", p.stratifyBy],
    ["correction", CORRECTION_LABELS[p.correction]],
    ["force_firth", p.forceFirth],
    ["level", p.level],
    ["confounding_threshold", p.confoundingThreshold],
    ["min_informative_clades", p.minInformativeClades ?? 3],
    ["sampling_covariates", (p.samplingCovariates ?? []).join("; ") || null],
    ["crisis_boundary", p.crisisBoundary !== undefined ? (run.results?.boundaries[p.crisisBoundary]?.label ?? `boundary ${p.crisisBoundary + 1}`) : null],
    ...(run.results?.cautions ?? []).map((c): [string, Cell] => ["caution", c]),
  ];
  return rows.map(([field, value]) => ({ field, value }));
}

function tableRows(run: Run, table: RunExportTable): Record_[] {
  if (table === "run") return runRows(run);
  if (table === "crisis") return crisisRows(run);
  if (table === "robustness") return robustnessRows(run);
  if (table === "sampling") return samplingRows(run);
  const out: Record_[] = [];
  for (const b of run.results?.boundaries ?? []) {
    const where = { boundary_ma: b.boundaryMa, window_myr: b.windowMyr, boundary_label: b.label };
    const { result } = b;
    if (table === "design") {
      const design = { ...where, victims: b.victims, survivors: b.survivors, not_at_risk: b.notAtRisk, overrides_applied: b.overridesApplied, complete_cases: b.completeCases };
      out.push(design);
      for (const t of result.traits) out.push({ ...where, trait_key: t.key, trait_label: t.label, used: t.used, dropped_missing: t.droppedMissing });
    }
    for (const t of table === "states" || table === "tests" || table === "contrasts" ? result.traits : []) {
      const trait = { ...where, trait_key: t.key, trait_label: t.label };
      if (table === "states") {
        for (const s of t.table) {
          out.push({ ...trait, state: s.state, state_label: s.label, victims: s.victims, survivors: s.survivors, proportion: s.proportion, ci_low: s.ci?.[0], ci_high: s.ci?.[1] });
        }
      } else if (table === "tests") {
        out.push({
          ...trait,
          method: t.test.method,
          statistic: t.test.statistic,
          df: t.test.df,
          p_value: t.test.pValue,
          adjusted_p_value: t.test.adjustedPValue,
          used: t.used,
          dropped_missing: t.droppedMissing,
          confounding_note: t.confoundingNote,
        });
      } else {
        for (const c of t.contrasts) {
          out.push({
            ...trait,
            contrast: c.contrast,
            state: c.state,
            reference: c.reference,
            crude_or: c.crude.estimate,
            crude_ci_low: c.crude.ci[0],
            crude_ci_high: c.crude.ci[1],
            crude_method: c.crude.method,
            clade_adjusted_or: c.cladeAdjusted?.estimate,
            clade_adjusted_ci_low: c.cladeAdjusted?.ci[0],
            clade_adjusted_ci_high: c.cladeAdjusted?.ci[1],
            clade_adjusted_method: c.cladeAdjusted?.method,
            clade_informative_clades: c.cladeAdjusted?.informativeClades,
            clade_adjusted_thin: c.cladeAdjusted?.thin,
            breslow_day_chi_square: c.cladeAdjusted?.breslowDay?.chiSquare,
            breslow_day_df: c.cladeAdjusted?.breslowDay?.df,
            breslow_day_p: c.cladeAdjusted?.breslowDay?.pValue,
            model_adjusted_or: c.modelAdjusted?.estimate,
            model_adjusted_ci_low: c.modelAdjusted?.ci[0],
            model_adjusted_ci_high: c.modelAdjusted?.ci[1],
            change_on_clade_adjustment: c.changeOnCladeAdjustment,
            change_on_model_adjustment: c.changeOnModelAdjustment,
            clade_standardised_or: c.cladeCheck?.standardised,
            clade_change_p: c.cladeCheck?.pValue,
            model_standardised_or: c.modelCheck?.standardised,
            model_change_p: c.modelCheck?.pValue,
            flagged: c.flagged,
            flag_decided_by: result.confoundingMethod ?? "change-in-estimate rule alone (run computed before the calibrated flag)",
          });
        }
      }
    }
    if (table === "coefficients") {
      for (const c of result.model?.coefficients ?? []) {
        out.push({ ...where, term: c.name, estimate: c.estimate, se: c.se, z: c.z, p_value: c.pValue, ci_low: c.ci[0], ci_high: c.ci[1], odds_ratio: c.oddsRatio, firth: result.model!.firth });
      }
    }
    if (table === "terms") {
      for (const t of result.model?.terms ?? []) out.push({ ...where, term: t.name, df: t.df, chi_square: t.chiSquare, p_value: t.pValue });
    }
  }
  return out;
}

/** The run's tables as CSV text: one table with its own columns, or all of them with a leading `table` column. */
export function runCsv(run: Run, table?: RunExportTable): string {
  if (table) {
    const columns = COLUMNS[table];
    return csvRow(columns) + tableRows(run, table).map((r) => csvRow(columns.map((c) => r[c]))).join("");
  }
  const columns = ["table", ...new Set(RUN_EXPORT_TABLES.flatMap((t) => COLUMNS[t]))];
  let text = csvRow(columns);
  for (const t of RUN_EXPORT_TABLES) {
    for (const r of tableRows(run, t)) text += csvRow(columns.map((c) => (c === "table" ? t : r[c])));
  }
  return text;
}

/** A file name for a run's download: its name in safe characters, the date and the short hash. */
export function runFileName(run: Run, extension: "csv" | "json", table?: RunExportTable): string {
  const slug =
    run.name
      .normalize("NFKD")
      .replace(/[^\w\s-]/g, "")
      .trim()
      .replace(/[\s_]+/g, "-")
      .toLowerCase()
      .slice(0, 60) || "run";
  const parts = [slug, run.createdAt.slice(0, 10), run.dataHash?.slice(0, 12), table].filter(Boolean);
  return `${parts.join("_")}.${extension}`;
}
