// Survivors and victims across a boundary, overrides and rates through time, through the API, on
// an invented study (invented genus "Fictoconcha" from an invented basin) whose outcomes are worked
// by hand below.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, count, eq } from "drizzle-orm";
import { codingDecisions, outcomeOverrides, taxa } from "../../db/schema/index";
import { createTestApp, type TestApp } from "../support/server";
import { castOfRoles, type Cast } from "./fixtures";

let app: TestApp;
let cast: Cast;

beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
});
afterAll(() => app.close());

/**
 * Wilson (1927) score interval written out in its textbook form (formula from memory), as an
 * independent cross-check of the server's value: centre (p + z²/2n) / (1 + z²/n), half-width
 * z sqrt(p(1 - p)/n + z²/4n²) / (1 + z²/n), with z = 1.959963984540054 for 95%.
 */
function textbookWilson(k: number, n: number): [number, number] {
  const z = 1.959963984540054;
  const p = k / n;
  const d = 1 + (z * z) / n;
  const centre = (p + (z * z) / (2 * n)) / d;
  const half = (z / d) * Math.sqrt((p * (1 - p)) / n + (z * z) / (4 * n * n));
  return [centre - half, centre + half];
}

// Boundary 66.0 Ma, the base of the Paleogene; the stage just below is the Maastrichtian,
// 72.2-66.0 Ma, so the default window is 6.2 Myr (ICS International Chronostratigraphic Chart
// v2024/12, Cohen, Harper, Gibbard & Car 2025, Episodes 48: 105-115). Outcomes worked by hand:
//   name        fad    lad   outcome at 66 Ma, window 6.2 Myr (victim: boundary <= lad <= 72.2)
//   alpha       80     60    survivor (80 > 66 > 60)
//   beta        70     66    victim: lad == boundary; whole range in the Maastrichtian -> single interval
//   delta       75     72.2  victim: lad == boundary + window; last seen below; single interval (Campanian 83.6-72.2)
//   epsilon     76     72.3  excluded: just older than the window
//   eta         85     68    victim, last seen below the boundary
//   gamma       66     62    excluded: fad == boundary (first seen at the boundary, never at risk)
//   iota        60     70    excluded: inverted range (invalid)
//   kappa       64     62    excluded: first seen after the boundary
//   lambda      68     64    survivor
//   mu          100    67    victim, last seen below the boundary
//   theta       -      65    excluded: missing first appearance
//   zeta        90     50    survivor
//   nu          80     67    deleted: ignored entirely
// Survivors 3 (alpha, lambda, zeta); victims 4 (beta, delta, eta, mu); excluded 5; total 12.
// Proportional extinction 4 / (4 + 3) = 0.5714.
const RANGES: Array<[string, number | null, number | null]> = [
  ["alpha", 80, 60],
  ["beta", 70, 66],
  ["delta", 75, 72.2],
  ["epsilon", 76, 72.3],
  ["eta", 85, 68],
  ["gamma", 66, 62],
  ["iota", 60, 70],
  ["kappa", 64, 62],
  ["lambda", 68, 64],
  ["mu", 100, 67],
  ["theta", null, 65],
  ["zeta", 90, 50],
];

/** A study holding the invented taxa above (plus one deleted taxon); returns the study and taxon ids by epithet. */
async function inventedStudy(): Promise<{ studyId: string; ids: Record<string, string> }> {
  const studyId = await cast.makeStudy("Invented basin: Fictoconcha across the boundary");
  const rows = await app.ctx.db
    .insert(taxa)
    .values([
      ...RANGES.map(([epithet, fad, lad]) => ({ studyId, name: `Fictoconcha ${epithet}`, higherTaxon: "Fictoconchidae", fadMa: fad, ladMa: lad })),
      { studyId, name: "Fictoconcha nu", higherTaxon: "Fictoconchidae", fadMa: 80, ladMa: 67, deletedAt: new Date() },
    ])
    .returning({ id: taxa.id, name: taxa.name });
  return { studyId, ids: Object.fromEntries(rows.map((r) => [r.name.replace("Fictoconcha ", ""), r.id])) };
}

const names = (page: { items: Array<{ name: string }> } | undefined) => page?.items.map((t) => t.name.replace("Fictoconcha ", ""));

describe("GET /api/studies/:studyId/outcomes", () => {
  let studyId: string;
  beforeAll(async () => {
    ({ studyId } = await inventedStudy());
  });

  it("gives a custom age inside a stage the distance to that stage's base as its default window, not the stage's duration", async () => {
    const res = await cast.people.viewer.agent.get(`/api/studies/${studyId}/outcomes?boundary=68`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    // ICS v2024/12 (Cohen, Harper, Gibbard & Car 2025, Episodes 48: 105-115): 68 Ma lies in the Maastrichtian (72.2-66.0 Ma),
    // so the window reaches its base: 72.2 - 68 = 4.2 Myr (the stage's 6.2 Myr would run to 74.2 Ma, into the Campanian).
    expect(res.body.window).toBeCloseTo(4.2, 9);
    expect(res.body.windowDefaultFrom).toMatchObject({ name: "Maastrichtian", base: 72.2, top: 66, wholeStage: false });
  });

  it("classifies the hand-worked taxa at 66 Ma with the Maastrichtian's duration as the default window", async () => {
    const res = await cast.people.viewer.agent.get(`/api/studies/${studyId}/outcomes?boundary=66`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const body = res.body;
    expect(body.boundary).toBe(66);
    // ICS v2024/12 (Cohen, Harper, Gibbard & Car 2025, Episodes 48: 105-115): Maastrichtian 72.2-66.0 Ma -> 6.2 Myr.
    expect(body.window).toBeCloseTo(6.2, 9);
    expect(body.windowDefaultFrom).toMatchObject({ name: "Maastrichtian", base: 72.2, top: 66, wholeStage: true });
    expect(body.counts).toEqual({ survivor: 3, victim: 4, excluded: 5, total: 12 });
    expect(body.computedCounts).toEqual(body.counts);
    expect(body.overridesApplied).toBe(0);
    expect(names(body.lists.survivor)).toEqual(["alpha", "lambda", "zeta"]);
    expect(names(body.lists.victim)).toEqual(["beta", "delta", "eta", "mu"]);
    expect(names(body.lists.excluded)).toEqual(["epsilon", "gamma", "iota", "kappa", "theta"]);
  });

  it("gives the proportional extinction with a Wilson 95% interval that matches the textbook formula", async () => {
    const { body } = await cast.people.viewer.agent.get(`/api/studies/${studyId}/outcomes?boundary=66`);
    // Worked by hand: 4 victims of 7 at risk = 0.571429; textbook Wilson (n = 7, z = 1.96): [0.25046, 0.84178].
    expect(body.proportionalExtinction).toMatchObject({ victims: 4, atRisk: 7, level: 0.95 });
    expect(body.proportionalExtinction.value).toBeCloseTo(4 / 7, 12);
    const [lo, hi] = textbookWilson(4, 7);
    expect(lo).toBeCloseTo(0.25046, 5);
    expect(hi).toBeCloseTo(0.84178, 5);
    expect(body.proportionalExtinction.ci[0]).toBeCloseTo(lo, 9);
    expect(body.proportionalExtinction.ci[1]).toBeCloseTo(hi, 9);
  });

  it("warns about single-interval taxa, victims last seen below the boundary and missing or invalid ranges, with counts", async () => {
    const { body } = await cast.people.viewer.agent.get(`/api/studies/${studyId}/outcomes?boundary=66`);
    // Worked by hand from the table above.
    expect(body.warnings.singleInterval).toMatchObject({ count: 2, sample: ["Fictoconcha beta", "Fictoconcha delta"] });
    expect(body.warnings.lastSeenBelowBoundary).toMatchObject({ count: 3, sample: ["Fictoconcha delta", "Fictoconcha eta", "Fictoconcha mu"] });
    expect(body.warnings.missingRange).toMatchObject({ count: 1, sample: ["Fictoconcha theta"] });
    expect(body.warnings.invalidRange).toMatchObject({ count: 1, sample: ["Fictoconcha iota"] });
    expect(body.warnings.lastSeenBelowBoundary.note).toMatch(/Signor & Lipps 1982/);
    const delta = body.lists.victim.items.find((t: { name: string }) => t.name === "Fictoconcha delta");
    expect(delta.flags).toEqual(["singleInterval", "lastSeenBelowBoundary"]);
    const theta = body.lists.excluded.items.find((t: { name: string }) => t.name === "Fictoconcha theta");
    expect(theta).toMatchObject({ computedOutcome: "excluded", flags: ["missingRange"], fad: null, lad: 65 });
    expect(theta.rangeProblem).toMatch(/first appearance/);
  });

  it("takes the boundary from a unit of the time scale and names the units that begin there", async () => {
    const res = await cast.people.viewer.agent.get(`/api/studies/${studyId}/outcomes?boundaryUnit=Paleogene`);
    expect(res.status).toBe(200);
    // ICS v2024/12: the Paleogene (and Cenozoic, Paleocene, Danian) base is 66.0 Ma.
    expect(res.body.boundary).toBe(66);
    expect(res.body.boundaryUnits.map((u: { name: string }) => u.name)).toEqual(["Cenozoic", "Paleogene", "Paleocene", "Danian"]);
    expect(res.body.counts).toEqual({ survivor: 3, victim: 4, excluded: 5, total: 12 });
  });

  it("uses a window given in Myr and says no default was used", async () => {
    const { body } = await cast.people.viewer.agent.get(`/api/studies/${studyId}/outcomes?boundary=66&window=2`);
    // Worked by hand, window 66-68 Ma: beta (66), eta (68 == 66 + 2) and mu (67) stay victims; delta (72.2) is now excluded.
    expect(body.window).toBe(2);
    expect(body.windowDefaultFrom).toBeNull();
    expect(body.counts).toEqual({ survivor: 3, victim: 3, excluded: 6, total: 12 });
    expect(names(body.lists.victim)).toEqual(["beta", "eta", "mu"]);
    expect(body.warnings.lastSeenBelowBoundary.count).toBe(2);
    // 3 of 6: textbook Wilson [0.18762, 0.81238].
    expect(body.proportionalExtinction.value).toBe(0.5);
    expect(body.proportionalExtinction.ci[0]).toBeCloseTo(textbookWilson(3, 6)[0], 9);
    expect(body.proportionalExtinction.ci[1]).toBeCloseTo(textbookWilson(3, 6)[1], 9);
  });

  it("pages through one group's list", async () => {
    const { body } = await cast.people.viewer.agent.get(`/api/studies/${studyId}/outcomes?boundary=66&group=excluded&page=2&pageSize=2`);
    expect(Object.keys(body.lists)).toEqual(["excluded"]);
    expect(body.lists.excluded).toMatchObject({ total: 5, page: 2, pageSize: 2 });
    expect(names(body.lists.excluded)).toEqual(["iota", "kappa"]);
  });

  it("refuses a request without a boundary, or an old custom age without a window, naming the field", async () => {
    const none = await cast.people.viewer.agent.get(`/api/studies/${studyId}/outcomes`);
    expect(none.status).toBe(400);
    expect(none.body.error.fields.boundary).toMatch(/boundary/);
    const unknownUnit = await cast.people.viewer.agent.get(`/api/studies/${studyId}/outcomes?boundaryUnit=Atlantian`);
    expect(unknownUnit.status).toBe(400);
    expect(unknownUnit.body.error.fields.boundaryUnit).toMatch(/not a unit/);
    // ICS v2024/12: the oldest stage (Fortunian) begins at 538.8 Ma, so 600 Ma has no stage below it.
    const tooOld = await cast.people.viewer.agent.get(`/api/studies/${studyId}/outcomes?boundary=600`);
    expect(tooOld.status).toBe(400);
    expect(tooOld.body.error.fields.window).toMatch(/window/);
    const withWindow = await cast.people.viewer.agent.get(`/api/studies/${studyId}/outcomes?boundary=600&window=5`);
    expect(withWindow.status).toBe(200);
    expect(withWindow.body.counts).toEqual({ survivor: 0, victim: 0, excluded: 12, total: 12 });
  });

  it("answers an empty study with zero counts and no proportion", async () => {
    const empty = await cast.makeStudy("Invented basin: empty");
    const { body } = await cast.people.viewer.agent.get(`/api/studies/${empty}/outcomes?boundary=66`);
    expect(body.counts).toEqual({ survivor: 0, victim: 0, excluded: 0, total: 0 });
    expect(body.proportionalExtinction).toMatchObject({ value: null, ci: null, atRisk: 0 });
  });
});

describe("outcome overrides", () => {
  let studyId: string;
  let ids: Record<string, string>;
  beforeAll(async () => {
    ({ studyId, ids } = await inventedStudy());
  });
  const outcomesAt = (query: string) => cast.people.viewer.agent.get(`/api/studies/${studyId}/outcomes?${query}`).then((r) => r.body);
  const itemOf = (body: { lists: Record<string, { items: Array<{ taxonId: string }> }> }, taxonId: string) =>
    Object.values(body.lists).flatMap((page) => page.items).find((t) => t.taxonId === taxonId) as Record<string, unknown>;

  it("flips a victim to a survivor, records a coding decision, and a revoke restores the computed outcome", async () => {
    const set = await cast.people.analyst.agent
      .post(`/api/studies/${studyId}/outcome-overrides`)
      .send({ taxonId: ids.eta, outcome: "survivor", boundaryMa: 66, reason: "Reappears in an invented upper bed after a gap" });
    expect(set.status, JSON.stringify(set.body)).toBe(201);
    expect(set.body.replacedOverrideId).toBeNull();
    expect(set.body.override).toMatchObject({ taxonName: "Fictoconcha eta", outcome: "survivor", boundaryMa: 66, source: "manual", active: true });
    expect(set.body.override.createdBy.id).toBe(cast.people.analyst.user.id);

    // Worked by hand: eta moves from victims to survivors: 4 survivors, 3 victims; 3 / 7 = 0.428571.
    const after = await outcomesAt("boundary=66");
    expect(after.counts).toEqual({ survivor: 4, victim: 3, excluded: 5, total: 12 });
    expect(after.computedCounts).toEqual({ survivor: 3, victim: 4, excluded: 5, total: 12 });
    expect(after.overridesApplied).toBe(1);
    expect(after.proportionalExtinction.value).toBeCloseTo(3 / 7, 12);
    expect(after.proportionalExtinction.ci[0]).toBeCloseTo(textbookWilson(3, 7)[0], 9); // textbook: 0.15822
    expect(itemOf(after, ids.eta)).toMatchObject({
      computedOutcome: "victim",
      outcome: "survivor",
      override: { id: set.body.override.id, reason: "Reappears in an invented upper bed after a gap" },
    });

    const decisions = await app.ctx.db
      .select()
      .from(codingDecisions)
      .where(and(eq(codingDecisions.taxonId, ids.eta), eq(codingDecisions.field, "outcome")));
    expect(decisions).toHaveLength(1);
    expect(decisions[0]).toMatchObject({ action: "override", userId: cast.people.analyst.user.id, reason: "Reappears in an invented upper bed after a gap" });

    const revoke = await cast.people.coder.agent
      .post(`/api/studies/${studyId}/outcome-overrides/${set.body.override.id}/revoke`)
      .send({ reason: "The upper bed turned out to be reworked" });
    expect(revoke.status, JSON.stringify(revoke.body)).toBe(200);
    expect(revoke.body).toMatchObject({ active: false, revokeReason: "The upper bed turned out to be reworked", revokedBy: { id: cast.people.coder.user.id } });

    const restored = await outcomesAt("boundary=66");
    expect(restored.counts).toEqual({ survivor: 3, victim: 4, excluded: 5, total: 12 });
    expect(itemOf(restored, ids.eta)).toMatchObject({ outcome: "victim", override: null });

    const revert = await app.ctx.db
      .select()
      .from(codingDecisions)
      .where(and(eq(codingDecisions.taxonId, ids.eta), eq(codingDecisions.action, "revert")));
    expect(revert).toHaveLength(1);
    expect(revert[0]).toMatchObject({ revertsId: decisions[0].id, userId: cast.people.coder.user.id });

    const again = await cast.people.coder.agent.post(`/api/studies/${studyId}/outcome-overrides/${set.body.override.id}/revoke`).send({ reason: "Twice" });
    expect(again.status).toBe(409);
  });

  it("lists overrides, active and revoked, with who, when and why", async () => {
    const res = await cast.people.reviewer.agent.get(`/api/studies/${studyId}/outcome-overrides`);
    expect(res.status).toBe(200);
    expect(res.body.total).toBeGreaterThanOrEqual(1);
    const revoked = await cast.people.reviewer.agent.get(`/api/studies/${studyId}/outcome-overrides?status=revoked`);
    expect(revoked.body.overrides.every((o: { active: boolean }) => !o.active)).toBe(true);
    expect(revoked.body.overrides[0]).toMatchObject({ taxonName: "Fictoconcha eta", reason: expect.any(String), revokeReason: expect.any(String) });
  });

  it("lets an override for this boundary win over one for any boundary, which still applies elsewhere", async () => {
    const anyBoundary = await cast.people.owner.agent
      .post(`/api/studies/${studyId}/outcome-overrides`)
      .send({ taxonId: ids.lambda, outcome: "excluded", boundaryMa: null, reason: "Known only from reworked material" });
    expect(anyBoundary.status).toBe(201);
    const atBoundary = await cast.people.owner.agent
      .post(`/api/studies/${studyId}/outcome-overrides`)
      .send({ taxonId: ids.lambda, outcome: "victim", boundaryMa: 66, reason: "In situ finds end at the boundary" });
    expect(atBoundary.status).toBe(201);

    expect(itemOf(await outcomesAt("boundary=66"), ids.lambda)).toMatchObject({ computedOutcome: "survivor", outcome: "victim" });
    // At 67 Ma lambda (68-64) would be a survivor; the override for any boundary makes it excluded.
    expect(itemOf(await outcomesAt("boundary=67"), ids.lambda)).toMatchObject({ computedOutcome: "survivor", outcome: "excluded" });

    for (const id of [atBoundary.body.override.id, anyBoundary.body.override.id]) {
      expect((await cast.people.owner.agent.post(`/api/studies/${studyId}/outcome-overrides/${id}/revoke`).send({ reason: "Test clean-up" })).status).toBe(200);
    }
    expect(itemOf(await outcomesAt("boundary=66"), ids.lambda)).toMatchObject({ outcome: "survivor", override: null });
  });

  it("replaces an active override of the same taxon and boundary, revoking the earlier one", async () => {
    const first = await cast.people.coder.agent
      .post(`/api/studies/${studyId}/outcome-overrides`)
      .send({ taxonId: ids.beta, outcome: "excluded", boundaryMa: 66, reason: "Reworked shells" });
    const second = await cast.people.coder.agent
      .post(`/api/studies/${studyId}/outcome-overrides`)
      .send({ taxonId: ids.beta, outcome: "survivor", boundaryMa: 66.0000000001, reason: "Found in place above the boundary" });
    expect(second.status).toBe(201);
    expect(second.body.replacedOverrideId).toBe(first.body.override.id);
    const [earlier] = await app.ctx.db.select().from(outcomeOverrides).where(eq(outcomeOverrides.id, first.body.override.id));
    expect(earlier.revokedAt).not.toBeNull();
    expect(itemOf(await outcomesAt("boundary=66"), ids.beta)).toMatchObject({ outcome: "survivor" });
    await cast.people.coder.agent.post(`/api/studies/${studyId}/outcome-overrides/${second.body.override.id}/revoke`).send({ reason: "Test clean-up" });
  });

  it("refuses overrides from viewers and reviewers, and ones without a reason or for another study's taxon", async () => {
    const body = { taxonId: ids.mu, outcome: "survivor", boundaryMa: 66, reason: "Guess" };
    for (const who of ["viewer", "reviewer"] as const) {
      const res = await cast.people[who].agent.post(`/api/studies/${studyId}/outcome-overrides`).send(body);
      expect(res.status).toBe(403);
    }
    const noReason = await cast.people.analyst.agent.post(`/api/studies/${studyId}/outcome-overrides`).send({ ...body, reason: "  " });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields.reason).toMatch(/reason/i);
    const other = await inventedStudy();
    const foreign = await cast.people.analyst.agent.post(`/api/studies/${studyId}/outcome-overrides`).send({ ...body, taxonId: other.ids.mu });
    expect(foreign.status).toBe(404);
    expect(foreign.body.error.fields.taxonId).toBeTruthy();
    const [{ n }] = await app.ctx.db.select({ n: count() }).from(outcomeOverrides).where(eq(outcomeOverrides.taxonId, ids.mu));
    expect(n).toBe(0);
  });
});

describe("imported outcome column (bulk overrides)", () => {
  let studyId: string;
  beforeAll(async () => {
    ({ studyId } = await inventedStudy());
  });
  const overrideCount = async () => (await app.ctx.db.select({ n: count() }).from(outcomeOverrides).where(eq(outcomeOverrides.studyId, studyId)))[0].n;

  it("refuses the whole column when a row names no taxon of the study, naming the row, and writes nothing", async () => {
    const res = await cast.people.coder.agent.post(`/api/studies/${studyId}/outcome-overrides/bulk`).send({
      boundaryMa: 66,
      reason: "Outcome column of the invented field survey",
      items: [
        { taxonName: "Fictoconcha alpha", outcome: "victim" },
        { taxonName: "Fictoconcha omega", outcome: "victim" },
        { taxonName: "Fictoconcha alpha", outcome: "survivor" },
      ],
    });
    expect(res.status).toBe(400);
    expect(res.body.error.fields["items.1.taxonName"]).toMatch(/Row 2.*Fictoconcha omega/);
    expect(res.body.error.fields["items.2.taxonName"]).toMatch(/Row 3.*also on row 1/);
    expect(res.body.error.message).toMatch(/Nothing was applied/);
    expect(await overrideCount()).toBe(0);
  });

  it("applies a valid column in one go, marked as imported, and a second import replaces it", async () => {
    const column = {
      boundaryMa: 66,
      reason: "Outcome column of the invented field survey",
      items: [
        { taxonName: "Fictoconcha alpha", outcome: "victim" },
        { taxonName: "Fictoconcha beta", outcome: "survivor" },
      ],
    };
    const res = await cast.people.coder.agent.post(`/api/studies/${studyId}/outcome-overrides/bulk`).send(column);
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body).toMatchObject({ created: 2, replaced: 0 });
    const decisions = await app.ctx.db.select().from(codingDecisions).where(eq(codingDecisions.batchId, res.body.batchId));
    expect(decisions.map((d) => d.action)).toEqual(["override", "override"]);

    // Worked by hand: alpha survivor -> victim and beta victim -> survivor leave 3 survivors and 4 victims.
    const { body } = await cast.people.viewer.agent.get(`/api/studies/${studyId}/outcomes?boundary=66`);
    expect(body.counts).toEqual({ survivor: 3, victim: 4, excluded: 5, total: 12 });
    expect(body.overridesApplied).toBe(2);
    expect(names(body.lists.survivor)).toEqual(["beta", "lambda", "zeta"]);
    expect(body.lists.victim.items[0]).toMatchObject({ name: "Fictoconcha alpha", computedOutcome: "survivor", override: { source: "import" } });

    const again = await cast.people.coder.agent.post(`/api/studies/${studyId}/outcome-overrides/bulk`).send(column);
    expect(again.body).toMatchObject({ created: 2, replaced: 2 });
    // The replacement is on record: each earlier override is reverted (pointing at the decision that set it),
    // and each new decision names the override it replaced as its old value.
    const replacing = await app.ctx.db.select().from(codingDecisions).where(eq(codingDecisions.batchId, again.body.batchId));
    const firstIds = new Set(decisions.map((d) => d.id));
    const reverts = replacing.filter((d) => d.action === "revert");
    expect(reverts).toHaveLength(2);
    expect(reverts.every((d) => firstIds.has(d.revertsId!))).toBe(true);
    const firstOverrideIds = new Set(decisions.map((d) => (d.newValue as { overrideId: string }).overrideId));
    const overrides = replacing.filter((d) => d.action === "override");
    expect(overrides.every((d) => firstOverrideIds.has((d.oldValue as { overrideId: string }).overrideId))).toBe(true);
    expect(decisions.every((d) => d.oldValue === null)).toBe(true);
    const active = await cast.people.viewer.agent.get(`/api/studies/${studyId}/outcome-overrides?status=active`);
    expect(active.body.total).toBe(2);
  });

  it("is refused to viewers and reviewers", async () => {
    for (const who of ["viewer", "reviewer"] as const) {
      const res = await cast.people[who].agent
        .post(`/api/studies/${studyId}/outcome-overrides/bulk`)
        .send({ boundaryMa: 66, reason: "x", items: [{ taxonName: "Fictoconcha mu", outcome: "survivor" }] });
      expect(res.status).toBe(403);
    }
  });
});

describe("GET /api/studies/:studyId/rates", () => {
  // Invented ranges and stages of ICS v2024/12 (Cohen, Harper, Gibbard & Car 2025, Episodes 48: 105-115):
  // Campanian 83.6-72.2, Maastrichtian 72.2-66.0, Danian 66.0-61.66, Selandian 61.66-59.24 Ma.
  //   A 83-62, B 80-70, C 75-67, D 70-68, E 64-62, F 80-61, G missing last appearance (left out).
  // Worked by hand (Foote 2000 classes; a range crosses an age t when fad > t > lad):
  //   Campanian:     A, B, C, F first seen inside and cross the top -> nFt 4; nothing crosses the base:
  //                  q undefined (null), proportional extinction 0/4 = 0.
  //   Maastrichtian: A, F cross both (nbt 2); B, C cross the base only (nbL 2); D inside (nFL 1):
  //                  q = ln(4/2) = 0.693147, per Myr / 6.2 = 0.111798; proportional extinction 3/5 = 0.6.
  //   Danian:        F crosses both (nbt 1); A crosses the base only (nbL 1); E inside (nFL 1):
  //                  q = ln 2 = 0.693147, per Myr / 4.34 = 0.159711; proportional extinction 2/3.
  //   Selandian:     F crosses the base only (nbL 1): q undefined (-ln 0, null); proportional extinction 1.
  it("gives per-stage counts, rates and proportions over the stages the taxa span, oldest first", async () => {
    const studyId = await cast.makeStudy("Invented basin: rates");
    const ranges: Array<[string, number, number | null]> = [
      ["A", 83, 62],
      ["B", 80, 70],
      ["C", 75, 67],
      ["D", 70, 68],
      ["E", 64, 62],
      ["F", 80, 61],
      ["G", 70, null],
    ];
    await app.ctx.db.insert(taxa).values(ranges.map(([name, fad, lad]) => ({ studyId, name: `Fictospira ${name}`, fadMa: fad, ladMa: lad })));
    const res = await cast.people.viewer.agent.get(`/api/studies/${studyId}/rates`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const { stages } = res.body;
    expect(stages.map((s: { name: string }) => s.name)).toEqual(["Campanian", "Maastrichtian", "Danian", "Selandian"]);
    expect(res.body.taxaUsed).toBe(6);
    expect(res.body.leftOut).toEqual({ missingRange: 1, invalidRange: 0 });

    expect(stages[0]).toMatchObject({ nbt: 0, nbL: 0, nFt: 4, nFL: 0, q: null, qPerMyr: null, proportionalExtinction: 0 });
    expect(stages[1]).toMatchObject({ nbt: 2, nbL: 2, nFt: 0, nFL: 1, base: 72.2, top: 66 });
    expect(stages[1].q).toBeCloseTo(0.693147, 6);
    expect(stages[1].qPerMyr).toBeCloseTo(0.111798, 6);
    expect(stages[1].proportionalExtinction).toBeCloseTo(0.6, 12);
    expect(stages[2]).toMatchObject({ nbt: 1, nbL: 1, nFt: 0, nFL: 1 });
    expect(stages[2].qPerMyr).toBeCloseTo(0.159711, 6);
    expect(stages[2].proportionalExtinction).toBeCloseTo(2 / 3, 12);
    expect(stages[3]).toMatchObject({ nbt: 0, nbL: 1, q: null, proportionalExtinction: 1 });

    // Common teaching threshold for a mass extinction, a convention (common practice, no source).
    expect(res.body.threshold.proportion).toBe(0.3);
    expect(res.body.threshold.note).toMatch(/convention/);
  });

  it("answers a study without usable ranges with no stages", async () => {
    const studyId = await cast.makeStudy("Invented basin: no ranges");
    const { body } = await cast.people.viewer.agent.get(`/api/studies/${studyId}/rates`);
    expect(body).toMatchObject({ stages: [], taxaUsed: 0 });
  });
});
