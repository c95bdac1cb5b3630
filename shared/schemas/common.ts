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

export const studyParamsSchema = z.object({ studyId: uuidSchema });

export const okSchema = z.object({ ok: z.literal(true) }).meta({ id: "Ok" });

export const isoDateSchema = z.string().meta({ description: "ISO 8601 date-time" });

/** Who did something: the person's id and name, or null once their account is gone. */
export const personOrNoneSchema = z.object({ id: z.uuid(), name: z.string() }).nullable();

/** The cautions that travel with analysis results. */
export const cautionsSchema = z.array(z.string()).meta({ description: "Shown with the results wherever they are read or exported" });

/** True only when A and B are the same type: pins a zod schema to the contract type it mirrors. */
export type Same<A, B> = [A] extends [B] ? ([B] extends [A] ? true : false) : false;

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
