// The study a page inside /studies/:studyId belongs to. The study layout loads it once and
// provides it here, so every study screen knows the study and the caller's role in it.
import { createContext, useContext } from "react";
import type { Study } from "@shared/schemas/studies";

export const CurrentStudyContext = createContext<Study | null>(null);

export function useCurrentStudy(): Study {
  const study = useContext(CurrentStudyContext);
  if (!study) throw new Error("useCurrentStudy() is only available on pages inside a study.");
  return study;
}
