import { describe, expect, it } from "vitest";
import { runParamsSchema } from "@shared/schemas/runs";

// The run parameters of crisis against background and the robustness panel, as the shared schema
// checks them on both sides (the Selectivity screen's form and POST /runs).
const base = {
  name: "Invented run",
  boundaries: [{ boundaryMa: 93.9 }, { boundaryMa: 89.4 }, { boundaryMa: 100.5 }],
  traits: [{ traitId: "7b7f1c1e-2a53-4a4c-9d0e-6f1b1c2d3e4f" }],
};
const messages = (input: unknown) => {
  const parsed = runParamsSchema.safeParse(input);
  return parsed.success ? {} : Object.fromEntries(parsed.error.issues.map((i) => [i.path.join("."), i.message]));
};

describe("crisisBoundary", () => {
  it("names one of the run's boundaries", () => {
    expect(runParamsSchema.parse({ ...base, crisisBoundary: 0 }).crisisBoundary).toBe(0);
    expect(runParamsSchema.parse(base).crisisBoundary).toBeUndefined();
    expect(messages({ ...base, crisisBoundary: 3 })).toEqual({ crisisBoundary: "crisisBoundary must name one of the 3 boundaries (0 to 2)" });
    expect(messages({ ...base, crisisBoundary: 1.5 })).toEqual({ crisisBoundary: "crisisBoundary must be a whole number (0 for the first boundary)" });
    expect(messages({ ...base, boundaries: [{ boundaryMa: 93.9 }], crisisBoundary: 0 }).crisisBoundary).toMatch(/^Crisis against background needs at least two boundaries/);
  });
});

describe("robustness", () => {
  it("fills the default windows and checks each factor", () => {
    expect(runParamsSchema.parse({ ...base, robustness: {} }).robustness).toEqual({ windowFactors: [0.5, 1.5, 2] });
    expect(runParamsSchema.parse({ ...base, robustness: { windowFactors: [0.75], truncationMyr: 0.5 } }).robustness).toEqual({ windowFactors: [0.75], truncationMyr: 0.5 });
    expect(messages({ ...base, robustness: { windowFactors: [0.5, Number.NaN] } })).toEqual({ "robustness.windowFactors.1": "Each window factor must be a number, e.g. 0.5 for half the window" });
    expect(messages({ ...base, robustness: { windowFactors: [0] } })).toEqual({ "robustness.windowFactors.0": "Each window factor must be greater than 0" });
    expect(messages({ ...base, robustness: { windowFactors: [1, 2, 3, 4, 5, 6, 7].map((v) => v + 0.5) } })).toEqual({ "robustness.windowFactors": "Give at most 6 window factors" });
    expect(messages({ ...base, robustness: { truncationMyr: -1 } })).toEqual({ "robustness.truncationMyr": "truncationMyr must be greater than 0" });
    expect(messages({ ...base, robustness: { extra: true } })).toHaveProperty("robustness");
  });
});
