import { describe, expect, it } from "vitest";
import { defaultWindowBelow, findUnit, windowToStageBase } from "@shared/timescale";

// Ages from ICS v2024/12 (Cohen, Harper, Gibbard & Car 2025, Episodes 48: 105-115), the chart the
// app ships: Maastrichtian 72.2-66.0 Ma, Cenomanian 100.5-93.9 Ma.
describe("the default window below a boundary", () => {
  it("is the whole stage below a boundary that is a stage's top", () => {
    const w = defaultWindowBelow(66);
    expect(w?.stage.name).toBe("Maastrichtian");
    expect(w?.windowMyr).toBeCloseTo(6.2, 9); // 72.2 - 66.0, the chart's ages
    expect(w?.wholeStage).toBe(true);
  });

  it("stops at the base of the stage a custom age falls in, instead of the stage's whole duration", () => {
    const w = defaultWindowBelow(94.2);
    expect(w?.stage.name).toBe("Cenomanian");
    expect(w?.windowMyr).toBe(6.3); // 100.5 - 94.2, rounded to a millionth of a Myr
    expect(w?.wholeStage).toBe(false);
    // The stage's duration (6.6 Myr) would have reached 100.8 Ma, below the Cenomanian's base.
    const cenomanian = findUnit("Cenomanian")!;
    expect(94.2 + w!.windowMyr).toBeCloseTo(cenomanian.base, 9);
  });

  it("is undefined at the base of the oldest stage (nothing lies below)", () => {
    expect(defaultWindowBelow(538.8)).toBeUndefined();
  });

  it("works on any stage-shaped record (the client's copy of the chart)", () => {
    expect(windowToStageBase(94.2, { base: 100.5, top: 93.9 })).toMatchObject({ windowMyr: 6.3, wholeStage: false });
    expect(windowToStageBase(93.9, { base: 100.5, top: 93.9 })).toMatchObject({ windowMyr: 6.6, wholeStage: true });
  });
});
