// Where a new study opens: its overview, or the screen of the first step a person chose before the
// study existed (`/studies/new?then=imports`).
import { paths } from "../../lib/paths";

export const FIRST_STEP_SCREENS = {
  codebook: { path: "codebook", name: "Codebook" },
  imports: { path: "imports", name: "Imports" },
  boundary: { path: "boundary", name: "Boundary" },
} as const;
export type FirstStep = keyof typeof FIRST_STEP_SCREENS;

export const newStudyThen = (step: FirstStep) => `${paths.newStudy}?then=${step}`;

/** The chosen step, or null for anything else (the study then opens on its overview). */
export function firstStepFrom(raw: string | null): FirstStep | null {
  return raw !== null && Object.hasOwn(FIRST_STEP_SCREENS, raw) ? (raw as FirstStep) : null;
}

export function pathAfterCreation(studyId: string, step: FirstStep | null): string {
  return step ? `${paths.study(studyId)}/${FIRST_STEP_SCREENS[step].path}` : paths.study(studyId);
}
