// Small pieces of SQL the stores share: lists as one query parameter, and how many rows one bulk
// statement carries.
import { sql } from "drizzle-orm";

/** A JSON list as one query parameter (a text array would need a driver-specific form). */
export const jsonParam = (value: unknown) => sql`${JSON.stringify(value)}::jsonb`;
/**
 * `= ANY(uuid[])` for a list of ids in one parameter. Not `IN (SELECT ... jsonb_array_elements)`:
 * before a fresh table has statistics the planner made that a nested loop that unpacked the list
 * once per taxon of the study (280 ms for a page of 200 of the demo's 1,200 taxa, 0.5 ms this way).
 */
export const anyUuid = (ids: string[]) => sql`ANY(${`{${ids.join(",")}}`}::uuid[])`;

/** Rows per bulk statement: a few MB of JSON, well inside what one statement handles quickly. */
export const WRITE_CHUNK = 5000;
