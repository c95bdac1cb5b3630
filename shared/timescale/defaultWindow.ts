import { stageBelow } from "./lookup";
import type { TimescaleUnit } from "./units";

/** The stage a default window comes from, and whether the window covers the whole stage. */
export interface DefaultWindow<Stage> {
  /** Myr from the boundary down to the base of the stage. */
  windowMyr: number;
  stage: Stage;
  /** True when the boundary is the stage's top (the window is the stage's duration); false for an age inside the stage. */
  wholeStage: boolean;
}

// Ages on the chart carry at most a few decimals; this keeps 100.5 - 94.2 from reading 6.299999999999997.
const roundMyr = (value: number) => Math.round(value * 1e6) / 1e6;

/**
 * The default window below a boundary, given the stage just below it (top <= boundary < base): the
 * distance from the boundary down to the base of that stage. At a stage's top this is the stage's
 * duration; for a custom age inside a stage it stops at the stage's base instead of running past it
 * (common practice, no source: a window does not reach into the stage below the one the age falls in).
 *
 * @example windowToStageBase(94.2, { base: 100.5, top: 93.9, duration: 6.6 }) // { windowMyr: 6.3, stage, wholeStage: false }
 */
export function windowToStageBase<Stage extends { base: number; top: number }>(boundary: number, stage: Stage): DefaultWindow<Stage> {
  const windowMyr = roundMyr(stage.base - boundary);
  const wholeStage = Math.abs(stage.top - boundary) <= 1e-9;
  return { windowMyr, stage, wholeStage };
}

/**
 * The default window below a boundary age on the chart (see windowToStageBase); undefined at or
 * below the base of the oldest stage, where no stage lies below.
 *
 * @example defaultWindowBelow(66) // { windowMyr: 6.2, stage: Maastrichtian, wholeStage: true }
 */
export function defaultWindowBelow(boundary: number): DefaultWindow<TimescaleUnit> | undefined {
  const stage = stageBelow(boundary);
  return stage ? windowToStageBase(boundary, stage) : undefined;
}
