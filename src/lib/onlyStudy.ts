// Where a person with exactly one study lands: straight in that study, the first time in a browser
// session that they arrive at the studies list (after signing in, or opening the address). Read by
// the studies list and by the sign-in form, which goes to the study directly instead of through the
// list, so the study's requests start a screen earlier.
import type { Study } from "@shared/schemas/studies";

/** sessionStorage key: set once this person has seen the studies list (or been taken to their only study) in this browser session. */
const listSeenKey = (userId: string) => `stratasieve:studies-list-seen:${userId}`;

function listSeen(userId: string): boolean {
  try {
    return window.sessionStorage.getItem(listSeenKey(userId)) !== null;
  } catch {
    return true; // storage refused: never redirect, the list always shows
  }
}

/** Remembers for this browser session that the person has arrived once (the list, or their only study). */
export function markListSeen(userId: string): void {
  try {
    window.sessionStorage.setItem(listSeenKey(userId), "1");
  } catch {
    // Nothing to remember without storage; listSeen then answers true.
  }
}

/** The study to open instead of the list on this arrival, or null (several studies, none, or arrived before). */
export function onlyStudyToOpen(userId: string, studies: Study[] | undefined): Study | null {
  return studies?.length === 1 && !listSeen(userId) ? studies[0] : null;
}
