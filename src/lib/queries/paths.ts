// API paths below /api that several screens call. One place, so a study's path is written once.

/** `/studies/:studyId` plus an optional tail such as `/traits`. */
export function studyApiPath(studyId: string, tail = ""): string {
  return `/studies/${encodeURIComponent(studyId)}${tail}`;
}

/** `/studies/:studyId/runs/:runId` plus an optional tail such as `/export`. */
export function runApiPath(studyId: string, runId: string, tail = ""): string {
  return studyApiPath(studyId, `/runs/${encodeURIComponent(runId)}${tail}`);
}

/** Where the browser downloads the study's codebook as CSV (same origin, the session cookie goes along). */
export const codebookCsvUrl = (studyId: string) => `/api${studyApiPath(studyId, "/exports/codebook.csv")}`;

/** Where the browser downloads an empty trait table laid out for the study's codebook. */
export const templateCsvUrl = (studyId: string) => `/api${studyApiPath(studyId, "/exports/template.csv")}`;
