// Sampling as a covariate through the run API: invented studies whose finds are uploaded as
// occurrences, then a selectivity run asks for the number of occurrences as a covariate. In the
// first, reef taxa only look more extinct because they were found rarely: the result says the odds
// ratio does not hold once sampling is allowed for; in the second the effect is the habitat's own and
// holds. Check values are worked by hand in tests/unit/sampling/samplingCovariateCheck.test.ts:
// without sampling the model's odds ratio is the 2x2 table's ad/bc (Agresti 2002, section 5.1; from
// memory); with log10(finds) it is 1 when every group of equally sampled taxa dies out alike.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { taxa, traits } from "../../db/schema/index";
import type { Run, RunParamsInput } from "../../shared/schemas/runs";
import { createTestApp, type TestApp } from "../support/server";
import { commitOccurrences } from "../support/occurrences";
import { castOfRoles, type Cast } from "./fixtures";

let app: TestApp;
let cast: Cast;
beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
}, 60_000);
afterAll(() => app.close());

type Group = { finds: number; reef: [number, number]; level: [number, number] };

/** A study of invented taxa across 66 Ma (victims last seen at 67 Ma), a habitat trait, and their finds uploaded as occurrences. */
async function sampledStudy(groups: Group[], withoutFinds: number): Promise<{ studyId: string; habitatId: string }> {
  const studyId = await cast.makeStudy("Invented basin: sampling");
  const [habitat] = await app.ctx.db
    .insert(traits)
    .values({ studyId, key: "habitat", label: "Habitat", kind: "binary", states: [{ code: "level", label: "Level bottom", order: 0 }, { code: "reef", label: "Reef", order: 1 }], sortOrder: 0 })
    .returning();
  const rows: Array<typeof taxa.$inferInsert> = [];
  const finds: string[] = ["taxon,max_ma,min_ma,collection"];
  let k = 0;
  for (const g of groups) {
    for (const [state, [n, victims]] of [["reef", g.reef], ["level", g.level]] as const) {
      for (let i = 0; i < n; i++) {
        const name = `Inventella sample${k++}`;
        const victim = i < victims;
        rows.push({ studyId, name, higherTaxon: "Inventidae", fadMa: 70, ladMa: victim ? 67 : 60, traitValues: { [habitat.id]: state } });
        for (let f = 0; f < g.finds; f++) finds.push(`${name},69,68,${name.replace(" ", "-")}-c${f % 7}`);
      }
    }
  }
  for (let i = 0; i < withoutFinds; i++) rows.push({ studyId, name: `Inventella unfound${i}`, higherTaxon: "Inventidae", fadMa: 70, ladMa: i % 2 ? 67 : 60, traitValues: { [habitat.id]: i % 3 ? "reef" : "level" } });
  await app.ctx.db.insert(taxa).values(rows);
  const { commit } = await commitOccurrences(cast.people.owner.agent, studyId, finds.join("\n") + "\n");
  expect(commit.status, JSON.stringify(commit.body)).toBe(200);
  return { studyId, habitatId: habitat.id };
}

async function run(studyId: string, body: RunParamsInput): Promise<Run> {
  const started = await cast.people.analyst.agent.post(`/api/studies/${studyId}/runs`).send(body);
  expect(started.status, JSON.stringify(started.body)).toBe(202);
  const deadline = Date.now() + 60_000;
  for (;;) {
    const res = await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs/${started.body.id}`);
    if (res.body.status === "succeeded" || res.body.status === "failed") return res.body as Run;
    if (Date.now() > deadline) throw new Error(`Run still ${res.body.status}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

describe("a run with sampling as a covariate", () => {
  it("says the habitat's odds ratio does not hold once sampling is allowed for when rarely found reef taxa only look extinct", async () => {
    const { studyId, habitatId } = await sampledStudy(
      [
        { finds: 1, reef: [50, 40], level: [10, 8] },
        { finds: 10, reef: [20, 10], level: [20, 10] },
        { finds: 100, reef: [10, 2], level: [50, 10] },
      ],
      4,
    );
    const done = await run(studyId, { name: "Sampling explains", boundaries: [{ boundaryMa: 66 }], traits: [{ traitId: habitatId, reference: "level" }], samplingCovariates: ["occurrences"] });
    expect(done.status, done.error ?? "").toBe("succeeded");
    expect(done.params.samplingCovariates).toEqual(["occurrences"]);
    const sampling = done.results!.boundaries[0]!.sampling!;
    expect(sampling).toMatchObject({ covariates: ["occurrences"], taxa: 160, withoutOccurrences: 4, note: null });
    const [reef] = sampling.contrasts;
    expect(reef.withoutSampling!.estimate).toBeCloseTo((52 * 52) / (28 * 28), 4); // ad/bc of the 160 taxa with finds
    expect(reef.withSampling!.estimate).toBeCloseTo(1, 5);
    expect(reef.verdict).toBe("does_not_hold");
    expect(reef.words).toMatch(/does not hold once sampling is allowed for/);
    expect(done.results!.cautions.join(" ")).toMatch(/rarely found taxon is more likely to look extinct/);

    const csv = await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs/${done.id}/export?format=csv&table=sampling`);
    expect(csv.status).toBe(200);
    expect(csv.text.split("\n")[0]).toMatch(/^boundary_ma,window_myr,boundary_label,covariates,taxa_with_occurrences,taxa_without_occurrences,trait,contrast,or_without_sampling/);
    expect(csv.text).toMatch(/does_not_hold/);
  });

  it("says it holds when the effect is the habitat's own, and a run without covariates has no sampling comparison", async () => {
    const { studyId, habitatId } = await sampledStudy(
      [
        { finds: 1, reef: [30, 24], level: [30, 12] },
        { finds: 10, reef: [30, 18], level: [30, 6] },
        { finds: 100, reef: [30, 12], level: [30, 3] },
      ],
      0,
    );
    const base = { boundaries: [{ boundaryMa: 66 }], traits: [{ traitId: habitatId, reference: "level" }] };
    const done = await run(studyId, { name: "Habitat's own", ...base, samplingCovariates: ["occurrences", "collections"] });
    expect(done.status, done.error ?? "").toBe("succeeded");
    const [reef] = done.results!.boundaries[0]!.sampling!.contrasts;
    expect(reef.withoutSampling!.estimate).toBeCloseTo((54 * 69) / (36 * 21), 4);
    expect(reef.verdict).toBe("holds");

    const plain = await run(studyId, { name: "No covariates", ...base });
    expect(plain.results!.boundaries[0]!.sampling).toBeUndefined();
    // A covariate the schema does not know is refused naming the field.
    const refused = await cast.people.analyst.agent.post(`/api/studies/${studyId}/runs`).send({ name: "Bad", ...base, samplingCovariates: ["abundance"] });
    expect(refused.status).toBe(400);
    expect(Object.keys(refused.body.error.fields).join(" ")).toMatch(/samplingCovariates/);
  });
});
