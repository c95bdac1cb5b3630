// Per-study roles and what each may do. Access is decided here, in one place, from
// (role, action); the server's `authorize` middleware and the client's buttons both read it.

export const STUDY_ROLES = ["owner", "coder", "analyst", "reviewer", "viewer"] as const;
export type StudyRole = (typeof STUDY_ROLES)[number];

export const ROLE_LABELS: Record<StudyRole, string> = {
  owner: "Study lead",
  coder: "Coder",
  analyst: "Analyst",
  reviewer: "Reviewer",
  viewer: "Guest",
};

export const ROLE_SUMMARIES: Record<StudyRole, string> = {
  owner: "Everything, plus members, invitations and study settings",
  coder: "Defines the codebook, imports and codes trait tables",
  analyst: "Derives outcomes, tests selectivity, saves runs and modern comparisons",
  reviewer: "Reads everything and discusses decisions and results",
  viewer: "Reads only",
};

export const STUDY_ACTIONS = {
  "study.read": ["owner", "coder", "analyst", "reviewer", "viewer"],
  "study.update": ["owner"],
  "study.delete": ["owner"],
  "members.read": ["owner", "coder", "analyst", "reviewer", "viewer"],
  "members.manage": ["owner"],
  "codebook.edit": ["owner", "coder"],
  // A study's own time bins are part of its definitions, edited by the codebook's editors.
  "timeBins.edit": ["owner", "coder"],
  "taxa.edit": ["owner", "coder"],
  "imports.run": ["owner", "coder"],
  "outcomes.override": ["owner", "coder", "analyst"],
  "runs.create": ["owner", "analyst"],
  "comparisons.create": ["owner", "analyst"],
  "threads.post": ["owner", "coder", "analyst", "reviewer"],
  "threads.resolve": ["owner", "coder"],
} as const satisfies Record<string, readonly StudyRole[]>;

export type StudyAction = keyof typeof STUDY_ACTIONS;

export function can(role: StudyRole | null | undefined, action: StudyAction): boolean {
  if (!role) return false;
  return (STUDY_ACTIONS[action] as readonly StudyRole[]).includes(role);
}

/** True when `holder` may do everything `other` may (owner covers every role; coder and analyst do not cover each other). */
export function roleCovers(holder: StudyRole, other: StudyRole): boolean {
  return (Object.keys(STUDY_ACTIONS) as StudyAction[]).every((action) => !can(other, action) || can(holder, action));
}

/**
 * The highest role whose rights both roles hold, e.g. what an API token made as coder may still do
 * once its owner is an analyst (reviewer: reading and posting). STUDY_ROLES runs from most to
 * least rights, and the viewer's rights are in every role.
 */
export function sharedRole(a: StudyRole, b: StudyRole): StudyRole {
  return STUDY_ROLES.find((r) => roleCovers(a, r) && roleCovers(b, r)) ?? "viewer";
}
