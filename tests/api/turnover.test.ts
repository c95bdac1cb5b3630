// Turnover through time on the invented demo study: the generator plants a crisis in extinction at the base of
// the Turonian (the Cenomanian genera die out with logistic odds far above the 13-16% background of the other
// stages) and no change in origination, so the crisis stage must stand out in extinction and not in origination.
// The small hand-worked study below checks the counts and the too-few-stages case.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { taxa } from "../../db/schema/index";
import { DEMO_ACCOUNTS, seedDemo, type DemoAccount, type DemoSeedResult } from "../../scripts/seed/demo/seed";
import { generateDemoStudy } from "../../scripts/seed/demo/generator";
import type { TurnoverResult } from "../../shared/schemas/turnover";
import { findUnit } from "../../shared/timescale/index";
import { createTestApp, uniqueEmail, type TestApp } from "../support/server";
import { castOfRoles, type Cast } from "./fixtures";

const data = generateDemoStudy();
const accounts: DemoAccount[] = DEMO_ACCOUNTS.map((a) => ({ ...a, email: uniqueEmail(`turnover-${a.role}`) }));

let app: TestApp;
let seeded: DemoSeedResult;
let viewer: ReturnType<typeof request.agent>;
let cast: Cast;

beforeAll(async () => {
  app = await createTestApp();
  seeded = await seedDemo(app.ctx.db, { data, accounts, env: { NODE_ENV: "test" } });
  viewer = request.agent(app.app);
  const account = accounts.find((a) => a.role === "viewer")!;
  const login = await viewer.post("/api/auth/login").send({ email: account.email, password: account.password });
  expect(login.status).toBe(200);
  cast = await castOfRoles(app);
});
afterAll(() => app.close());

async function turnover(query: string): Promise<TurnoverResult> {
  const res = await viewer.get(`/api/studies/${seeded.studyId}/turnover?${query}`);
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.body as TurnoverResult;
}

describe("GET /api/studies/:studyId/turnover on the demo study", () => {
  let result: TurnoverResult;
  beforeAll(async () => {
    result = await turnover("boundaryUnit=Turonian&splitBy=life_habit");
  });

  it("marks the Cenomanian as the stage the boundary closes", () => {
    expect(result.boundary).toBe(findUnit("Turonian")!.base);
    expect(result.crisisStage?.name).toBe("Cenomanian");
    expect(result.stages.filter((s) => s.crisis).map((s) => s.name)).toEqual(["Cenomanian"]);
    // the generator's stages, Hauterivian to Campanian, oldest first; the two ends are edge stages
    expect(result.stages.map((s) => s.name)).toEqual(["Hauterivian", "Barremian", "Aptian", "Albian", "Cenomanian", "Turonian", "Coniacian", "Santonian", "Campanian"]);
    expect(result.stages.filter((s) => s.edge).map((s) => s.name)).toEqual(["Hauterivian", "Campanian"]);
  });

  it("finds the crisis standing out in extinction and not in origination", () => {
    const { extinction, origination, departing, sentence } = result.contrast!;
    expect(extinction.n).toBeGreaterThanOrEqual(5);
    expect(extinction.z!).toBeGreaterThanOrEqual(3.5);
    expect(extinction.departs).toBe(true);
    expect(Math.abs(origination.z!)).toBeLessThan(3.5);
    expect(origination.departs).toBe(false);
    expect(departing).toBe("extinction");
    expect(sentence).toMatch(/extinction departs from its background/);
    expect(sentence).toMatch(/origination stays within its background/);
  });

  it("gives the same q and p per stage as the rates route", async () => {
    const rates = (await viewer.get(`/api/studies/${seeded.studyId}/rates`)).body as { stages: Array<{ name: string; q: number | null; p: number | null; taxonCount: number }> };
    expect(result.stages.map((s) => [s.name, s.q, s.p, s.rangeThrough])).toEqual(rates.stages.map((s) => [s.name, s.q, s.p, s.taxonCount]));
  });

  it("splits diversity by life habit, the states' counts adding up to the overall count in every stage", () => {
    expect(result.diversity.splitBy).toEqual({ kind: "trait", key: "life_habit", label: expect.any(String) });
    const keys = result.diversity.groups.map((g) => g.key);
    for (const habit of ["infaunal", "epifaunal", "nektonic", "planktonic", "terrestrial"]) expect(keys).toContain(habit);
    result.stages.forEach((stage, k) => {
      const sum = result.diversity.groups.reduce((total, g) => total + g.stages[k].rangeThrough, 0);
      expect(sum).toBe(stage.rangeThrough);
    });
    // The hard-hit clade is mostly infaunal (generator): fewer than half the infaunal genera present in the Cenomanian cross its top
    const infaunal = result.diversity.groups.find((g) => g.key === "infaunal")!;
    const cenomanian = infaunal.stages[result.stages.findIndex((s) => s.crisis)];
    expect(cenomanian.crossingTop).toBeLessThan(cenomanian.rangeThrough / 2);
    expect(result.diversity.cautions.join(" ")).toMatch(/inflate|richer/);
    expect(result.diversity.cautions.join(" ")).toMatch(/truncated/);
    expect(result.diversity.splitOptions.map((o) => o.value)).toEqual(expect.arrayContaining(["higherTaxon", "life_habit", "environment", "feeding"]));
  });

  it("gives the scorecard with what the study cannot assess said so", () => {
    const byCriterion = Object.fromEntries(result.scorecard.items.map((i) => [i.criterion, i]));
    expect(Object.keys(byCriterion)).toEqual(["magnitude", "breadth", "realms", "geography", "brevity", "standingOut"]);
    // Magnitude: the outcome tiles' proportion with its interval, wholly above 30%
    expect(byCriterion.magnitude.status).toBe("meets");
    expect(byCriterion.magnitude.ci![0]).toBeGreaterThan(0.3);
    // The demo codes range size as a number of regions, not which regions: geography not assessable
    expect(byCriterion.geography.status).toBe("not assessable");
    expect(byCriterion.geography.summary).toMatch(/^Not assessable from this study: the study codes .* as a number/);
    // The demo codes marine and non-marine genera (environment)
    expect(byCriterion.realms.dimensions[0].key).toBe("environment");
    expect(byCriterion.brevity).toMatchObject({ status: "reported", value: result.window });
    expect(byCriterion.standingOut.status).toBe("meets");
    expect(byCriterion.standingOut.value).toBeCloseTo(result.contrast!.extinction.z!, 10);
    expect(result.scorecard.source).toMatch(/common practice, no single source/);
    expect(result.scorecard.caution).toMatch(/not a global verdict/);
  });

  it("matches the outcome tiles' victims and taxa at risk", async () => {
    const outcomes = (await viewer.get(`/api/studies/${seeded.studyId}/outcomes?boundaryUnit=Turonian&pageSize=1`)).body;
    const magnitude = result.scorecard.items.find((i) => i.criterion === "magnitude")!;
    expect(magnitude.value).toBeCloseTo(outcomes.proportionalExtinction.value, 12);
    expect(magnitude.ci).toEqual(outcomes.proportionalExtinction.ci);
  });

  it("splits by higher taxon, and gives no groups without a split", async () => {
    const byClade = await turnover("boundaryUnit=Turonian&splitBy=higherTaxon");
    expect(byClade.diversity.splitBy.kind).toBe("higherTaxon");
    expect(byClade.diversity.groups.map((g) => g.key)).toContain(data.plantedEffects.hardHitClade);
    const plain = await turnover("boundaryUnit=Turonian");
    expect(plain.diversity).toMatchObject({ splitBy: { kind: "none" }, groups: [] });
  });

  it("refuses an unknown split, a missing boundary and a bad share, naming the field", async () => {
    const unknown = await viewer.get(`/api/studies/${seeded.studyId}/turnover?boundaryUnit=Turonian&splitBy=wing_colour`);
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.fields).toHaveProperty("splitBy");
    const numeric = await viewer.get(`/api/studies/${seeded.studyId}/turnover?boundaryUnit=Turonian&splitBy=body_size`);
    expect(numeric.status).toBe(400);
    const missing = await viewer.get(`/api/studies/${seeded.studyId}/turnover`);
    expect(missing.status).toBe(400);
    expect(missing.body.error.fields).toHaveProperty("boundary");
    const share = await viewer.get(`/api/studies/${seeded.studyId}/turnover?boundaryUnit=Turonian&breadthShare=1.5`);
    expect(share.status).toBe(400);
    expect(share.body.error.fields).toHaveProperty("breadthShare");
  });

  it("is in the OpenAPI document", () => {
    expect(Object.keys(app.openapi.paths as Record<string, unknown>)).toContain("/api/studies/{studyId}/turnover");
  });
});

describe("GET /api/studies/:studyId/turnover on a small invented study", () => {
  // Three invented genera around the base of the Paleogene (66.0 Ma; Maastrichtian 72.2-66.0, Danian 66.0-61.6,
  // Campanian 83.6-72.2: ICS chart v2024/12). Counted by hand (a range crosses t when fad > t > lad):
  //   alpha 80-62: Campanian (crosses top), Maastrichtian (crosses both), Danian (crosses base, last seen)
  //   beta  70-67: Maastrichtian only (single stage), a victim at 66 Ma
  //   gamma 75-63: Campanian (crosses top), Maastrichtian (both), Danian (crosses base, last seen)
  // Three stages: far too few for a background (a robust z needs 5 other stages).
  let studyId: string;
  beforeAll(async () => {
    studyId = await cast.makeStudy("Invented basin: turnover");
    const ranges = [["alpha", 80, 62], ["beta", 70, 67], ["gamma", 75, 63]] as const;
    await app.ctx.db.insert(taxa).values(ranges.map(([name, fad, lad]) => ({ studyId, name: `Fictoturnia ${name}`, higherTaxon: "Fictoturnidae", fadMa: fad, ladMa: lad })));
  });

  it("counts standing diversity per stage and says there are too few stages", async () => {
    const res = await cast.people.viewer.agent.get(`/api/studies/${studyId}/turnover?boundary=66`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const body = res.body as TurnoverResult;
    expect(body.stages.map((s) => [s.name, s.rangeThrough, s.crossingBase, s.crossingTop])).toEqual([
      ["Campanian", 2, 0, 2],
      ["Maastrichtian", 3, 2, 2],
      ["Danian", 2, 2, 0],
    ]);
    expect(body.crisisStage?.name).toBe("Maastrichtian");
    expect(body.contrast).toMatchObject({ departing: "not assessable" });
    expect(body.contrast!.sentence).toMatch(/only \d other stages? ha(s|ve) a rate \(5 are needed\)/);
    const standingOut = body.scorecard.items.find((i) => i.criterion === "standingOut")!;
    expect(standingOut.status).toBe("not assessable");
    // Magnitude: beta is the one victim of 3 at risk (alpha and gamma survive)
    expect(body.scorecard.items[0]).toMatchObject({ criterion: "magnitude", value: 1 / 3 });
    // No environment trait in this study's codebook
    expect(body.scorecard.items.find((i) => i.criterion === "realms")!.status).toBe("not assessable");
  });
});

describe("turnover and scorecard CSV exports on the demo study", () => {
  it("downloads one row per stage with q, p, counts and a column per life habit", async () => {
    const res = await viewer.get(`/api/studies/${seeded.studyId}/exports/turnover.csv?boundaryUnit=Turonian&splitBy=life_habit`);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/text\/csv/);
    expect(res.headers["content-disposition"]).toMatch(/attachment; filename=".*-turnover\.csv"/);
    const json = await turnover("boundaryUnit=Turonian&splitBy=life_habit");
    const lines = res.text.trim().split("\r\n");
    const header = lines[0].split(",");
    expect(header.slice(0, 6)).toEqual(["stage", "base_ma", "top_ma", "duration_myr", "crisis_stage", "edge_stage"]);
    expect(header).toContain("range_through_infaunal");
    expect(lines).toHaveLength(json.stages.length + 1);
    const cenomanian = lines.find((l) => l.startsWith("Cenomanian,"))!.split(",");
    const stage = json.stages.find((s) => s.crisis)!;
    const cell = (name: string) => cenomanian[header.indexOf(name)];
    expect(cell("crisis_stage")).toBe("true");
    expect(Number(cell("q_per_stage"))).toBe(stage.q);
    expect(Number(cell("p_per_stage"))).toBe(stage.p);
    expect(Number(cell("range_through"))).toBe(stage.rangeThrough);
    const infaunal = json.diversity.groups.find((g) => g.key === "infaunal")!;
    expect(Number(cell("range_through_infaunal"))).toBe(infaunal.stages[json.stages.indexOf(stage)].rangeThrough);
  });

  it("downloads the scorecard with the contrasts, every criterion, the groups read and the caution", async () => {
    const res = await viewer.get(`/api/studies/${seeded.studyId}/exports/scorecard.csv?boundaryUnit=Turonian`);
    expect(res.status).toBe(200);
    const lines = res.text.trim().split("\r\n");
    expect(lines[0]).toBe("row,criterion,status,dimension,group,value,ci_low,ci_high,victims,at_risk,z,median,mad,n,note");
    expect(lines.some((l) => l.startsWith("contrast,extinction_q,departs,,Cenomanian,"))).toBe(true);
    expect(lines.some((l) => l.startsWith("contrast,origination_p,within background,,Cenomanian,"))).toBe(true);
    for (const criterion of ["magnitude", "breadth", "realms", "geography", "brevity", "standingOut"]) {
      expect(lines.some((l) => l.startsWith(`criterion,${criterion},`))).toBe(true);
    }
    expect(lines.find((l) => l.startsWith("criterion,geography,"))).toMatch(/^criterion,geography,not assessable,/);
    expect(lines.some((l) => l.startsWith("group,realms,") && l.includes(",environment,"))).toBe(true);
    expect(res.text).toMatch(/not a global verdict/);
    expect(res.text).toMatch(/common practice, no single source/);
  });
});
