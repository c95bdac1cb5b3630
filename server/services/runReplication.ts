// A saved run as a folder a reviewer can check without the app: the exact rows the run analysed
// (taxon, clade, outcome, every trait as coded), how each trait entered, the app's numbers, and an
// R script that recomputes what base R can (crude and Mantel-Haenszel odds ratios, the per-trait
// tests, the adjusted p-values and the multiple regression) and prints both side by side.
import { readFileSync } from "node:fs";
import { strToU8, zipSync } from "fflate";
import { csvRow } from "../../shared/csv/write";
import type { Run } from "../../shared/schemas/runs";
import type { Database } from "../db";
import { conflict } from "../domain/errors";
import { readStudyData, type RunDataSources } from "./runData";
import { runFileName } from "./runExport";

const RERUN_SCRIPT = readFileSync(new URL("../replication/rerun.R", import.meta.url), "utf8");
const README = readFileSync(new URL("../replication/README.txt", import.meta.url), "utf8");

type Cell = string | number | boolean | null | undefined;
/** One number of the app's results and whether base R computes the same quantity the same way. */
interface AppNumber {
  boundary: number;
  trait: string;
  state: string;
  quantity: string;
  value: number | null;
  /** Empty when base R recomputes it by the same method; otherwise why not. */
  notCompared: string;
}

const csv = (columns: string[], rows: Cell[][]) => csvRow(columns) + rows.map((r) => csvRow(r)).join("");

const FIRTH_NOTE = "Firth's penalised likelihood: base R's glm has no penalty, so this is not recomputed";

/** The app's numbers of one run, each marked for comparison or with the reason it is not compared. */
export function appNumbers(run: Run): AppNumber[] {
  const out: AppNumber[] = [];
  for (const [index, b] of (run.results?.boundaries ?? []).entries()) {
    const boundary = index + 1;
    const { result } = b;
    const testsCompared = result.traits.every((t) => t.test.pValue === null || comparableTest(t.test.method) === "");
    for (const t of result.traits) {
      if (t.test.pValue !== null) {
        out.push({ boundary, trait: t.key, state: "", quantity: "test_p", value: t.test.pValue, notCompared: comparableTest(t.test.method) });
        out.push({
          boundary,
          trait: t.key,
          state: "",
          quantity: "adjusted_p",
          value: t.test.adjustedPValue,
          notCompared: testsCompared ? "" : "another trait's test of this boundary is not recomputed the same way, so the adjustment runs over other p-values",
        });
      }
      for (const c of t.contrasts) {
        const state = c.state ?? "";
        const crudeNote = /Firth/i.test(c.crude.method) ? FIRTH_NOTE : "";
        out.push({ boundary, trait: t.key, state, quantity: "crude_or", value: c.crude.estimate, notCompared: crudeNote });
        out.push({ boundary, trait: t.key, state, quantity: "crude_ci_low", value: c.crude.ci[0], notCompared: crudeNote });
        out.push({ boundary, trait: t.key, state, quantity: "crude_ci_high", value: c.crude.ci[1], notCompared: crudeNote });
        if (c.cladeAdjusted) {
          const mh = /Mantel-Haenszel/.test(c.cladeAdjusted.method);
          const note = mh ? "" : `${c.cladeAdjusted.method}: not recomputed with base R`;
          out.push({ boundary, trait: t.key, state, quantity: "clade_adjusted_or", value: c.cladeAdjusted.estimate, notCompared: note });
          out.push({ boundary, trait: t.key, state, quantity: "clade_adjusted_ci_low", value: c.cladeAdjusted.ci[0], notCompared: note });
          out.push({ boundary, trait: t.key, state, quantity: "clade_adjusted_ci_high", value: c.cladeAdjusted.ci[1], notCompared: note });
        }
      }
    }
    const model = result.model;
    for (const coefficient of model?.coefficients ?? []) {
      const note = model!.firth ? FIRTH_NOTE : "";
      out.push({ boundary, trait: "(model)", state: coefficient.name, quantity: "coefficient", value: coefficient.estimate, notCompared: note });
      out.push({ boundary, trait: "(model)", state: coefficient.name, quantity: "coefficient_se", value: coefficient.se, notCompared: note });
    }
  }
  return out;
}

/** "" when base R's fisher.test or glm computes the per-trait test by the same method. */
function comparableTest(method: string): string {
  if (/^Fisher exact test|^Fisher-Freeman-Halton exact test|^Likelihood ratio test in a logistic regression/.test(method)) return "";
  return `${method}: base R computes this test differently, so it is not compared`;
}

/** The run's files, ready to zip: data, design, the app's numbers, the script and a read-me. */
export function replicationFiles(run: Run, data: Awaited<ReturnType<typeof readStudyData>>): Record<string, string> {
  const keys = data.specs.map((s) => s.key);
  const rows: Cell[][] = [];
  data.boundaries.forEach((b, i) => {
    for (const t of b.taxa) rows.push([i + 1, b.design.label, t.id, t.name, t.clade ?? "", t.outcome, ...keys.map((k) => t.values[k] ?? null)]);
  });
  const traitRows: Cell[][] = [];
  const columnRows: Cell[][] = [];
  for (const [i, b] of (run.results?.boundaries ?? []).entries()) {
    for (const t of b.result.traits) {
      const spec = data.specs.find((s) => s.key === t.key)!;
      traitRows.push([i + 1, t.key, spec.kind === "numeric" ? "numeric" : "states", t.reference, spec.transform, spec.standardise, spec.states.map((s) => s.code).join("|")]);
    }
    b.result.model?.encoding.columns.forEach((c, k) => {
      columnRows.push(c.kind === "state" ? [i + 1, k + 1, c.name, c.trait, "state", c.state, null, null, null] : [i + 1, k + 1, c.name, c.trait, "numeric", null, c.transform, c.center, c.scale]);
    });
  }
  const numbers = appNumbers(run);
  return {
    "rows.csv": csv(["boundary", "boundary_label", "taxon_id", "taxon", "clade", "outcome", ...keys], rows),
    "traits.csv": csv(["boundary", "key", "kind", "reference", "transform", "standardise", "states"], traitRows),
    "model-columns.csv": csv(["boundary", "column", "name", "trait", "kind", "state", "transform", "center", "scale"], columnRows),
    "app-results.csv": csv(
      ["boundary", "trait", "state", "quantity", "app", "not_compared"],
      numbers.map((n) => [n.boundary, n.trait, n.state, n.quantity, n.value, n.notCompared]),
    ),
    "settings.csv": csv(["field", "value"], [["level", run.params.level], ["correction", run.params.correction], ["data_hash_sha256", run.dataHash], ["app_version", run.appVersion]]),
    "run.json": JSON.stringify(run, null, 2),
    "rerun.R": RERUN_SCRIPT,
    "README.txt": README,
  };
}

export function createRunReplicationService(db: Database, sources: RunDataSources, runs: { get(studyId: string, runId: string): Promise<Run> }) {
  return {
    /** The zip of a succeeded run, read again from the study; refused when the data changed since the run. */
    async bundle(studyId: string, runId: string): Promise<{ fileName: string; zip: Uint8Array }> {
      const run = await runs.get(studyId, runId);
      if (run.status !== "succeeded" || !run.results) throw conflict("This run has no results yet: only a run that finished can be downloaded for a re-run.");
      const data = await readStudyData(db, sources, studyId, run.params);
      if (data.dataHash !== run.dataHash) {
        throw conflict(
          `The study's data changed since this run (the run read data with hash ${run.dataHash?.slice(0, 12)}, the study now gives ${data.dataHash.slice(0, 12)}), so its exact rows are no longer there. Re-run it and download the new run.`,
        );
      }
      const folder = runFileName(run, "csv").replace(/\.csv$/, "-rerun");
      const files = replicationFiles(run, data);
      const zip = zipSync(Object.fromEntries(Object.entries(files).map(([name, text]) => [`${folder}/${name}`, strToU8(text)])));
      return { fileName: `${folder}.zip`, zip };
    },
  };
}
