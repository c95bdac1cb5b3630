import { z } from "zod";

/** Every error answer of the API: `{ error: { code, message, fields? } }`. */
export const apiErrorSchema = z
  .object({
    error: z.object({
      code: z.string(),
      message: z.string(),
      fields: z.record(z.string(), z.string()).optional(),
    }),
  })
  .meta({ id: "ApiError" });
export type ApiError = z.infer<typeof apiErrorSchema>;

export const uuidSchema = z.uuid({ message: "must be a valid id (UUID)" });

/**
 * No age is older than the Earth: 4,567 Ma, the age of the Solar System's oldest solids
 * (Connelly et al. 2012, Science 338: 651-655, from memory), the usual upper bound of geological
 * ages (common practice). Taxon ranges given in the API, in imports and in the grid are held to it.
 */
export const AGE_LIMIT_MA = 4567;
export const AGE_LIMIT_MESSAGE = `Age must be at most ${AGE_LIMIT_MA.toLocaleString("en-US")} Ma: nothing is older than the Earth`;

export const studyParamsSchema = z.object({ studyId: uuidSchema });

export const okSchema = z.object({ ok: z.literal(true) }).meta({ id: "Ok" });

export const isoDateSchema = z.string().meta({ description: "ISO 8601 date-time" });

/** Who did something: the person's id and name, or null once their account is gone. */
export const personOrNoneSchema = z.object({ id: z.uuid(), name: z.string() }).nullable();

/** The cautions that travel with analysis results. */
export const cautionsSchema = z.array(z.string()).meta({ description: "Shown with the results wherever they are read or exported" });

/**
 * The query of a CSV/JSON export made of several tables: `format`, and `table` to pick one
 * table of the CSV (by default all of them, each row naming its table in the first column).
 */
export function exportQuerySchema<const T extends readonly [string, ...string[]]>(tables: T, defaultFormat: "json" | "csv", tablesDescription: string) {
  return z.object({
    format: z.enum(["json", "csv"], { message: "format must be json or csv" }).default(defaultFormat),
    table: z
      .enum(tables, { message: `table must be one of ${tables.join(", ")}` })
      .optional()
      .meta({ description: `CSV only: one table (${tablesDescription}); default: all, each row naming its table in the first column` }),
  });
}

// ---------------------------------------------------------------- text that comes in

/**
 * A lone UTF-16 surrogate: a high half (U+D800-U+DBFF) without the low half after it, or a low
 * half (U+DC00-U+DFFF) without the high half before it. JSON can carry one ("\ud800"); it is not
 * Unicode text (PostgreSQL's jsonb refuses it, text columns would store U+FFFD instead).
 */
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

/** The first lone surrogate of the text as "U+D83D", or null when the text is well-formed. */
export function loneSurrogateIn(text: string): string | null {
  const match = LONE_SURROGATE.exec(text);
  return match ? `U+${match[0].charCodeAt(0).toString(16).toUpperCase()}` : null;
}

export const loneSurrogateMessage = (where: string, codePoint: string) =>
  `${where} holds a lone UTF-16 surrogate (${codePoint}), half of a character that is not valid text; retype the character`;

/** A path longer than this many parts is cut (with …) in the answer. */
const MAX_PATH_PARTS = 12;

/**
 * The first string (or object key) anywhere in a request's input that holds a lone surrogate, with
 * its path ("changes.name", "values.0"): the one place every route refuses such text, before its
 * own schema reads the input. Walks with its own stack, so a deeply nested body cannot overflow
 * the call stack.
 */
export function findLoneSurrogate(value: unknown): { path: string; codePoint: string } | null {
  // Each entry names its parent, so the path is spelled out only for the value at fault.
  interface Visit {
    value: unknown;
    key: string | number | null;
    parent: Visit | null;
  }
  const pathOf = (visit: Visit, last?: string) => {
    const parts: Array<string | number> = last === undefined ? [] : [last];
    for (let v: Visit | null = visit; v && v.key !== null; v = v.parent) parts.push(v.key);
    parts.reverse();
    // A path through absurd nesting is cut, so the answer stays small.
    return (parts.length > MAX_PATH_PARTS ? [...parts.slice(0, MAX_PATH_PARTS), "…"] : parts).join(".") || "_";
  };
  const stack: Visit[] = [{ value, key: null, parent: null }];
  while (stack.length) {
    const visit = stack.pop()!;
    const current = visit.value;
    if (typeof current === "string") {
      const codePoint = loneSurrogateIn(current);
      if (codePoint) return { path: pathOf(visit), codePoint };
    } else if (Array.isArray(current)) {
      for (let i = current.length - 1; i >= 0; i--) stack.push({ value: current[i], key: i, parent: visit });
    } else if (current && typeof current === "object") {
      const entries = Object.entries(current);
      for (const [key] of entries) {
        const codePoint = loneSurrogateIn(key);
        if (codePoint) return { path: pathOf(visit, key), codePoint };
      }
      for (let i = entries.length - 1; i >= 0; i--) stack.push({ value: entries[i][1], key: entries[i][0], parent: visit });
    }
  }
  return null;
}

/** Line breaks, tabs and other control characters (C0, DEL, C1) and the Unicode line and paragraph separators. */
// eslint-disable-next-line no-control-regex -- finding control characters is the point
const CONTROL_CHARACTER = /[\u0000-\u001F\u007F-\u009F\u2028\u2029]/;

/** Why the text cannot be one line of `label` (a line break or other control character, or a lone surrogate), or null. */
export function oneLineProblem(label: string, text: string): string | null {
  const control = CONTROL_CHARACTER.exec(text);
  if (control) {
    const code = `U+${control[0].charCodeAt(0).toString(16).toUpperCase().padStart(4, "0")}`;
    const what = control[0] === "\n" || control[0] === "\r" ? "a line break" : control[0] === "\t" ? "a tab" : `a control character (${code})`;
    return `${label} must be one line of text: it holds ${what}`;
  }
  const surrogate = loneSurrogateIn(text);
  return surrogate ? loneSurrogateMessage(label, surrogate) : null;
}

/**
 * Checks of a one-line text field (a person's, study's, taxon's or list's name, a label, a
 * title): no line break or other control character, which would break the line it is shown on
 * (an e-mail header or body, a table cell), and no lone surrogate. Used as `.check(oneLine("Name"))`.
 */
export function oneLine(label: string) {
  return z.superRefine((text: string, ctx) => {
    const problem = oneLineProblem(label, text);
    if (problem) ctx.addIssue({ code: "custom", message: problem });
  });
}

/** Checks of free text that may span lines (notes, descriptions, posts): no lone surrogate. Used as `.check(wellFormed("Notes"))`. */
export function wellFormed(label: string) {
  return z.superRefine((text: string, ctx) => {
    const surrogate = loneSurrogateIn(text);
    if (surrogate) ctx.addIssue({ code: "custom", message: loneSurrogateMessage(label, surrogate) });
  });
}
