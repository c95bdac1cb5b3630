// The demo study's saved analyses: the crisis run, a run across several stage boundaries (so the
// heat map of traits by boundary has content), the modern list's crosswalk and one modern
// comparison. Each is computed and stored by the same service code the app uses (the runs through
// computeRunNow, since no process works the job queue while the seed runs), inside the seed's
// transaction. All of it reads invented data, and the names say so.
import { and, eq } from "drizzle-orm";
import type { NodePgDatabase } from "drizzle-orm/node-postgres";
import * as schema from "../../../db/schema/index";
import { activity, comparisons, modernLists } from "../../../db/schema/index";
import { computeRunNow } from "../../../server/services/runAnalysis";
import type { RunDataSources } from "../../../server/services/runData";
import { createOutcomeService } from "../../../server/services/outcomes";
import { createTraitService } from "../../../server/services/traits";
import { createModernListService } from "../../../server/services/modernLists";
import { createComparisonService } from "../../../server/services/comparisons";
import { runParamsSchema, type RunParams } from "../../../shared/schemas/runs";
import { comparisonParamsSchema } from "../../../shared/schemas/comparisons";
import type { Crosswalk } from "../../../shared/comparison/index";
import { findUnit } from "../../../shared/timescale/index";
import { MODERN_CROSSWALK, type DemoStudy } from "./generator";

type Db = NodePgDatabase<typeof schema>;

export const DEMO_CRISIS_RUN_NAME = "Crisis at the base of the Turonian, five traits (invented demo)";
export const DEMO_SWEEP_RUN_NAME = "Five traits across four stage boundaries (invented demo)";
export const DEMO_COMPARISON_NAME = "Modern Vessiran species against the crisis model (invented demo)";

/** The stages whose bases the second run tests, oldest first: the crisis (base of the Turonian) and the background around it. */
export const DEMO_SWEEP_STAGES = ["Albian", "Cenomanian", "Turonian", "Coniacian"] as const;

export interface DemoAnalyses {
  crisisRunId: string;
  sweepRunId: string;
  comparisonId: string;
}

function stageBase(name: string): number {
  const unit = findUnit(name);
  if (!unit) throw new Error(`The time scale has no stage "${name}"`);
  return unit.base;
}

/**
 * The list's crosswalk as the invented list was written (MODERN_CROSSWALK): every value of a column
 * with states is listed, and values the codebook has no state for ("unknown") map to no state.
 */
export function demoCrosswalk(traitIdByKey: Map<string, string>, columns: Array<{ name: string; values: string[] }>): Crosswalk {
  return {
    pairs: Object.entries(MODERN_CROSSWALK).map(([column, spec]) => {
      const values = columns.find((c) => c.name === column)?.values ?? [];
      const states: Record<string, string> = "states" in spec ? spec.states : {};
      return {
        traitId: traitIdByKey.get(spec.trait)!,
        column,
        states: "states" in spec ? Object.fromEntries(values.map((v) => [v, states[v] ?? null])) : {},
        multiplier: 1,
      };
    }),
  };
}

/**
 * Runs, crosswalk and comparison of the demo study, dated by `at(daysBefore)`. `db` is the seed's
 * transaction: the services take it like a database (their own transactions become savepoints).
 */
export async function seedDemoAnalyses(
  db: Db,
  input: {
    data: DemoStudy;
    studyId: string;
    listId: string;
    analystId: string;
    traitIdByKey: Map<string, string>;
    listColumns: Array<{ name: string; values: string[] }>;
    at: (daysBefore: number) => Date;
  },
): Promise<DemoAnalyses> {
  const { data, studyId, listId, at } = input;
  const analyst = { id: input.analystId };
  const sources: RunDataSources = { outcomes: createOutcomeService(db), traits: createTraitService(db) };
  // Every trait of the codebook with the screen's defaults: the most common state as reference, the codebook's transform.
  const traits = data.traits.map((t) => ({ traitId: input.traitIdByKey.get(t.key)! }));
  const params = (name: string, boundaries: RunParams["boundaries"], extra: Partial<RunParams> = {}): RunParams => runParamsSchema.parse({ name, boundaries, traits, ...extra });

  // The crisis with the default window (the Cenomanian, the stage below the boundary).
  const crisis = await computeRunNow(db, sources, studyId, analyst, params(DEMO_CRISIS_RUN_NAME, [{ boundaryMa: data.plantedEffects.boundary.ageMa }]), { at: at(6) });
  const sweep = await computeRunNow(
    db,
    sources,
    studyId,
    analyst,
    params(
      DEMO_SWEEP_RUN_NAME,
      DEMO_SWEEP_STAGES.map((stage) => ({ boundaryMa: stageBase(stage) })),
      // The base of the Turonian is the crisis; the other three boundaries are background.
      { crisisBoundary: DEMO_SWEEP_STAGES.indexOf("Turonian") },
    ),
    { at: at(5) },
  );

  await createModernListService(db).saveCrosswalk(studyId, listId, analyst, demoCrosswalk(input.traitIdByKey, input.listColumns));
  const comparison = await createComparisonService(db).create(
    studyId,
    analyst,
    comparisonParamsSchema.parse({ name: DEMO_COMPARISON_NAME, listId, runId: crisis.id, boundaryIndex: 0 }),
  );

  // The services date what they write "now"; the invented history places it a few days back.
  await db.update(modernLists).set({ updatedAt: at(4) }).where(eq(modernLists.id, listId));
  await db
    .update(activity)
    .set({ createdAt: at(4) })
    .where(and(eq(activity.refId, listId), eq(activity.kind, "modern_list.crosswalk_saved")));
  await db.update(comparisons).set({ createdAt: at(3) }).where(eq(comparisons.id, comparison.id));
  await db.update(activity).set({ createdAt: at(3) }).where(eq(activity.refId, comparison.id));

  return { crisisRunId: crisis.id, sweepRunId: sweep.id, comparisonId: comparison.id };
}
