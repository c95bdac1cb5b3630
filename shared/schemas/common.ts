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
