// The navigation inside a study, in the order of the product's screen list. A new study screen
// adds one line here (and its route in router.tsx); screens not built yet are simply absent.
import type { StudyAction } from "@shared/roles";

export interface StudyNavItem {
  label: string;
  /** Path below /studies/:studyId; "" is the overview. */
  path: string;
  /** Shown only to roles allowed this action (omit for every member). */
  requires?: StudyAction;
}

export const STUDY_NAV: readonly StudyNavItem[] = [
  { label: "Overview", path: "" },
  { label: "Trait table", path: "table" },
  { label: "Codebook", path: "codebook" },
  { label: "Imports", path: "imports" },
  { label: "Boundary", path: "boundary" },
  // Boundary, Selectivity, Runs, Modern comparison and Threads go here, in that order.
  { label: "Selectivity", path: "selectivity" },
  { label: "Runs", path: "runs" },
  { label: "Modern comparison", path: "modern-comparison" },
  { label: "Threads", path: "threads" },
  { label: "Members", path: "members" },
];
