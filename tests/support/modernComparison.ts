// Set-up for modern-comparison rows of the role matrix: a modern list (with or without a saved
// crosswalk), a finished run whose model scores it, a saved comparison and an upload, written
// directly or by the owner so only the call under test is judged. Every name is invented.
import { randomUUID } from "node:crypto";
import type { BrowserContext } from "playwright-core";
import { comparisons, modernLists, modernSpecies, runs, traits } from "../../db/schema/index";
import type { Cast } from "../api/fixtures";
import { studyWithFinishedCrisisRun, type InventedCrisis } from "./inventedCrisis";
import type { TestApp } from "./server";

type Agent = Cast["anonymous"];

/** A binary trait, a list of six invented species paired with it (when asked), and a finished run whose model holds the trait. */
export async function matrixModernSetup(app: TestApp, studyId: string, opts: { crosswalk: boolean } = { crosswalk: true }) {
  const key = `mc_${randomUUID().slice(0, 8)}`;
  const [trait] = await app.ctx.db
    .insert(traits)
    .values({ studyId, key, label: "Matrix habitat", kind: "binary", states: [{ code: "sea", label: "Sea", order: 0 }, { code: "lake", label: "Lake", order: 1 }] })
    .returning();
  const [list] = await app.ctx.db
    .insert(modernLists)
    .values({
      studyId,
      name: "Matrix list (invented)",
      speciesCount: 6,
      columns: [{ name: "water", values: ["lake", "sea"] }],
      crosswalk: opts.crosswalk ? { pairs: [{ traitId: trait.id, column: "water", states: { sea: "sea", lake: "lake" }, multiplier: 1 }] } : {},
    })
    .returning();
  const categories = ["CR", "EN", "VU", "NT", "LC", "DD"];
  await app.ctx.db
    .insert(modernSpecies)
    .values(categories.map((category, i) => ({ listId: list.id, name: `Matrixia ${i} (invented)`, category, rawTraits: { water: i % 2 ? "lake" : "sea" } })));
  const model = {
    n: 20,
    victims: 10,
    droppedIncomplete: 0,
    method: "invented",
    coefficients: [
      { name: "(Intercept)", label: "(Intercept)", estimate: -0.5, se: 0.3, z: -1.7, pValue: 0.1, ci: [-1.1, 0.1], oddsRatio: 0.61, oddsRatioCi: [0.33, 1.1] },
      { name: `${key}=lake`, label: "Matrix habitat: Lake (vs Sea)", estimate: 1, se: 0.4, z: 2.5, pValue: 0.01, ci: [0.2, 1.8], oddsRatio: 2.7, oddsRatioCi: [1.2, 6] },
    ],
    terms: [],
    deviance: 20,
    nullDeviance: 25,
    aic: 24,
    converged: true,
    firth: false,
    firthReason: null,
    separatedPredictors: [],
    encoding: {
      traits: [{ key, label: "Matrix habitat", kind: "states", reference: "sea", states: ["sea", "lake"] }],
      columns: [{ name: `${key}=lake`, trait: key, kind: "state", state: "lake" }],
    },
    covariance: [
      [0.09, -0.05],
      [-0.05, 0.16],
    ],
    notes: [],
  };
  const [run] = await app.ctx.db
    .insert(runs)
    .values({
      studyId,
      name: "Matrix scoring run",
      status: "succeeded",
      params: { name: "Matrix scoring run", boundaries: [{ boundaryMa: 66 }], traits: [{ traitId: trait.id }], stratifyBy: "higherTaxon", correction: "bh", forceFirth: false, level: 0.95, confoundingThreshold: 0.1 },
      appVersion: "0.0.0",
      dataHash: "0".repeat(64),
      results: {
        boundaries: [
          {
            boundaryMa: 66,
            windowMyr: 6.2,
            windowDefaultFrom: null,
            label: "Base of the Danian (66 Ma)",
            victims: 10,
            survivors: 10,
            notAtRisk: 0,
            overridesApplied: 0,
            completeCases: 20,
            result: { design: { victims: 10, survivors: 10, droppedByTrait: {}, completeCases: 20 }, traits: [], model, modelNote: null },
          },
        ],
        traits: [{ traitId: trait.id, key, label: "Matrix habitat" }],
        cautions: [],
      },
    })
    .returning();
  return { listId: list.id, runId: run.id, traitId: trait.id };
}

/** A saved comparison of the study, as the service would leave it (results kept minimal). */
export async function matrixComparison(app: TestApp, studyId: string): Promise<string> {
  const { listId, runId } = await matrixModernSetup(app, studyId);
  const [row] = await app.ctx.db
    .insert(comparisons)
    .values({
      studyId,
      listId,
      runId,
      name: "Matrix comparison",
      params: { name: "Matrix comparison", listId, runId, boundaryIndex: 0, worthALookMin: 0.5, level: 0.95 },
      dataHash: "1".repeat(64),
      results: {
        counts: {
          species: 0,
          byCategory: { EX: 0, EW: 0, CR: 0, EN: 0, VU: 0, NT: 0, LC: 0, DD: 0, NE: 0 },
          threatened: 0,
          notThreatened: 0,
          excluded: { EX: 0, EW: 0, DD: 0, NE: 0 },
          excludedTotal: 0,
          scored: { threatened: 0, notThreatened: 0, excluded: 0 },
          unscored: { threatened: 0, notThreatened: 0, excluded: 0 },
        },
        unscoredReasons: [],
        roc: null,
        rocNote: "Matrix",
        spearman: null,
        spearmanNote: "Matrix",
        traits: [],
        worthALook: [],
        species: [],
        notes: [],
        run: { id: runId, name: "Matrix scoring run", dataHash: null, boundaryLabel: "66 Ma", boundaryMa: 66, modelMethod: "invented", modelN: 20 },
        list: { id: listId, name: "Matrix list (invented)", speciesCount: 6 },
        crosswalk: { pairs: [] },
        crosswalkLabels: [],
        cautions: [],
      },
      appVersion: "0.0.0",
    })
    .returning({ id: comparisons.id });
  return row.id;
}

/** An upload of a small invented list by `agent` (the owner in the matrix); returns its id. */
export async function matrixModernUpload(agent: Agent, studyId: string): Promise<string> {
  const res = await agent
    .post(`/api/studies/${studyId}/modern-list-uploads`)
    .attach("file", Buffer.from(`species,status,water\nMatrixia ${randomUUID().slice(0, 6)} (invented),LC,sea\n`, "utf8"), "matrix-list.csv");
  if (res.status !== 201) throw new Error(`test setup: modern list upload ${res.status} ${JSON.stringify(res.body)}`);
  return res.body.upload.id;
}

export const MATRIX_LIST_MAPPING = { name: "species", category: "status", traitColumns: ["water"] };

/**
 * The invented crisis of the modern-comparison browser tests: 40 invented genera per life habit;
 * 10 epifaunal, 20 nektonic and 30 infaunal died out, so the run's model (habit alone, saturated)
 * predicts 0.25, 0.5 and 0.75.
 */
const CRISIS_HABITS = [
  { code: "epifaunal", victims: 10 },
  { code: "nektonic", victims: 20 },
  { code: "infaunal", victims: 30 },
];

/** The crisis of the modern-comparison tests, as rows (the API test) or as a finished run (the browser tests). */
export const MODERN_CRISIS: InventedCrisis = { habits: CRISIS_HABITS, perHabit: 40, genus: "Priscella", higherTaxon: () => "Priscellidae" };

/** A study lead signed up in `context`, a study with the suggested codebook, the invented crisis, and a finished run (set up through the API). */
export async function studyWithFinishedHabitRun(server: TestApp & { url: string }, context: BrowserContext): Promise<{ studyUrl: string }> {
  const { studyUrl } = await studyWithFinishedCrisisRun(server, context, MODERN_CRISIS, { study: "Invented basin crisis", run: "Life habit across 66 Ma" });
  return { studyUrl };
}
