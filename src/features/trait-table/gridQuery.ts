// What the grid asks the server for: one page of taxa, sorted and filtered on the server. The
// query string is also the page's cache key, so equal requests share one cache entry.
import { formatTaxaFilter, type FilterOp, type TaxaColumnFilter } from "@shared/schemas/taxa";

export const PAGE_SIZES = [100, 200, 500] as const;
export const DEFAULT_PAGE_SIZE = 200;

export interface GridQuery {
  /** A taxon column (name, higherTaxon, fadMa, ladMa, notes, updatedAt) or a trait id. */
  sort: string;
  dir: "asc" | "desc";
  filters: TaxaColumnFilter[];
  /** Columns that must be empty: a trait id, fad, lad, higherTaxon or notes. */
  missing: string[];
  hasOpenThread: boolean;
  /** From 1, as the API counts. */
  page: number;
  pageSize: number;
}

export const initialGridQuery: GridQuery = { sort: "name", dir: "asc", filters: [], missing: [], hasOpenThread: false, page: 1, pageSize: DEFAULT_PAGE_SIZE };

export function gridQueryString(q: GridQuery): string {
  const params = new URLSearchParams();
  params.set("page", String(q.page));
  params.set("pageSize", String(q.pageSize));
  return `${params}&${matchingQueryString(q)}`;
}

/** The sort and filters without the paging: what taxa/ids takes to list every matching taxon. */
export function matchingQueryString(q: GridQuery): string {
  const params = new URLSearchParams();
  params.set("sort", q.sort);
  params.set("dir", q.dir);
  for (const f of q.filters) params.append("filter", formatTaxaFilter(f));
  for (const m of q.missing) params.append("missing", m);
  if (q.hasOpenThread) params.set("hasOpenThread", "true");
  return params.toString();
}

/** The same filter twice would only narrow nothing; adding it again is a no-op. */
export function addFilter(filters: TaxaColumnFilter[], next: TaxaColumnFilter): TaxaColumnFilter[] {
  const same = (f: TaxaColumnFilter) => f.column === next.column && f.op === next.op;
  // One bound of each kind per column: a new minimum replaces the old one.
  return [...filters.filter((f) => !same(f)), next];
}

export const OP_WORDS: Record<FilterOp, string> = { contains: "contains", eq: "is", min: "≥", max: "≤" };
