// The time scale as the API serves it from the seeded table, checked against the published chart.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { createTestApp, signedInAgent, type TestApp } from "../support/server";
import type { Timescale } from "../../shared/schemas/timescale";

let app: TestApp;
let timescale: Timescale;

beforeAll(async () => {
  app = await createTestApp();
  const person = await signedInAgent(app, "timescale");
  const res = await person.agent.get("/api/timescale");
  if (res.status !== 200) throw new Error(`GET /api/timescale answered ${res.status}: ${JSON.stringify(res.body)}`);
  timescale = res.body;
});
afterAll(() => app.close());

const unit = (name: string, rank: string) => {
  const found = timescale.units.find((u) => u.name === name && u.rank === rank);
  if (!found) throw new Error(`${rank} ${name} is not served`);
  return found;
};

describe("GET /api/timescale", () => {
  it("names the chart version and its citation", () => {
    expect(timescale.version).toBe("2024/12");
    expect(timescale.citation).toMatch(/Cohen, Harper, Gibbard & Car 2025/);
  });

  it("serves the base ages of five boundaries as published", () => {
    // Source of each value: ICS International Chronostratigraphic Chart v2024/12
    // (Cohen, Harper, Gibbard & Car 2025, Episodes 48: 105-115).
    expect(unit("Silurian", "Period").base).toBe(443.1); // ICS v2024/12: Silurian base 443.1 +/- 1.0 Ma
    expect(unit("Silurian", "Period").uncertainty).toBe(1.0); // ICS v2024/12
    expect(unit("Famennian", "Age").base).toBe(372.15); // ICS v2024/12: Famennian base 372.15 +/- 0.46 Ma
    expect(unit("Triassic", "Period").base).toBe(251.902); // ICS v2024/12: Triassic base 251.902 +/- 0.024 Ma
    expect(unit("Jurassic", "Period").base).toBe(201.4); // ICS v2024/12: Jurassic base 201.4 +/- 0.2 Ma
    expect(unit("Paleogene", "Period").base).toBe(66.0); // ICS v2024/12: Paleogene base 66.0 Ma
  });

  it("gives each unit its top from the next younger unit's base, and its duration", () => {
    // ICS v2024/12: Maastrichtian base 72.2 Ma, below the Danian (base 66.0 Ma) -> 6.2 Myr.
    expect(unit("Maastrichtian", "Age")).toMatchObject({ base: 72.2, top: 66, duration: 6.2, parent: "UpperCretaceous", label: "Maastrichtian" });
    // Tops are not in the chart data: a unit ends where the next younger unit of its rank begins.
    expect(unit("Jurassic", "Period").top).toBe(unit("Cretaceous", "Period").base);
  });

  it("lists every period, epoch and stage of the Phanerozoic, youngest first, stages tiling without gaps", () => {
    const stages = timescale.units.filter((u) => u.rank === "Age");
    for (let i = 1; i < stages.length; i++) expect(stages[i].top, `${stages[i].name} meets ${stages[i - 1].name}`).toBe(stages[i - 1].base);
    expect(stages[0].top).toBe(0);
    expect(timescale.units.filter((u) => u.rank === "Period")).toHaveLength(12); // ICS v2024/12: twelve Phanerozoic systems, Cambrian to Quaternary
  });

  it("is for signed-in people only", async () => {
    const res = await request(app.app).get("/api/timescale");
    expect(res.status).toBe(401);
  });
});
