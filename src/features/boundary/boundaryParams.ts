// The chosen boundary, window and list live in the address, so a copied link reproduces the view:
//   ?unit=Turonian            the base of a unit of the time scale
//   ?age=94.2                 a custom age in Ma
//   &window=4.5               the window below the boundary in Myr (absent: the stage just below)
//   &list=victim&page=2       which list is open, and its page
// The address is checked with the same schema the server uses for the outcomes query.
import { BOUNDARY_OUTCOMES, outcomesQuerySchema, type BoundaryOutcomeName } from "@shared/schemas/outcomes";
import type { MainBoundary } from "@shared/schemas/studies";
import { issuesToFieldErrors } from "../../lib/forms";

export type BoundaryChoice = { kind: "unit"; name: string } | { kind: "age"; age: number };

export interface BoundaryView {
  choice: BoundaryChoice | null;
  /** Window in Myr; undefined means the default (the duration of the stage just below). */
  window: number | undefined;
  list: BoundaryOutcomeName;
  page: number;
  /** Messages about parts of the address that could not be read (a hand-edited or truncated link). */
  problems: string[];
}

const PARAM = { unit: "unit", age: "age", window: "window", list: "list", page: "page" } as const;

export function readBoundaryView(search: URLSearchParams): BoundaryView {
  const unit = search.get(PARAM.unit) ?? undefined;
  const age = search.get(PARAM.age) ?? undefined;
  const window = search.get(PARAM.window) ?? undefined;
  const rawList = search.get(PARAM.list);
  const list = (BOUNDARY_OUTCOMES as readonly string[]).includes(rawList ?? "") ? (rawList as BoundaryOutcomeName) : "victim";
  const rawPage = Number(search.get(PARAM.page) ?? "1");
  const page = Number.isInteger(rawPage) && rawPage >= 1 ? rawPage : 1;

  if (unit === undefined && age === undefined) {
    return { choice: null, window: undefined, list, page, problems: [] };
  }
  const parsed = outcomesQuerySchema.safeParse({ boundaryUnit: unit, boundary: age, window });
  if (!parsed.success) {
    const messages = Object.values(issuesToFieldErrors(parsed.error));
    return { choice: null, window: undefined, list, page, problems: messages.map((m) => `The link’s boundary could not be read: ${m}.`) };
  }
  const query = parsed.data;
  const choice: BoundaryChoice = query.boundaryUnit !== undefined ? { kind: "unit", name: query.boundaryUnit } : { kind: "age", age: query.boundary as number };
  return { choice, window: query.window, list, page, problems: [] };
}

/** The address after choosing a boundary: the window is kept, the list goes back to its first page. */
export function withChoice(search: URLSearchParams, choice: BoundaryChoice): URLSearchParams {
  const next = new URLSearchParams(search);
  next.delete(PARAM.unit);
  next.delete(PARAM.age);
  next.delete(PARAM.page);
  if (choice.kind === "unit") next.set(PARAM.unit, choice.name);
  else next.set(PARAM.age, String(choice.age));
  return next;
}

/** The address that opens the study's main boundary: its unit by name, or its age, with the run's window when it gave one. */
export function mainBoundarySearch(search: URLSearchParams, main: MainBoundary): URLSearchParams {
  const next = withChoice(search, main.unit ? { kind: "unit", name: main.unit } : { kind: "age", age: main.boundaryMa });
  return main.windowMyr !== null && !search.has(PARAM.window) ? withWindow(next, main.windowMyr) : next;
}

/** The address with a window in Myr, or without one (undefined: the default window). */
export function withWindow(search: URLSearchParams, window: number | undefined): URLSearchParams {
  const next = new URLSearchParams(search);
  next.delete(PARAM.page);
  if (window === undefined) next.delete(PARAM.window);
  else next.set(PARAM.window, String(window));
  return next;
}

export function withList(search: URLSearchParams, list: BoundaryOutcomeName, page = 1): URLSearchParams {
  const next = new URLSearchParams(search);
  next.set(PARAM.list, list);
  if (page > 1) next.set(PARAM.page, String(page));
  else next.delete(PARAM.page);
  return next;
}
