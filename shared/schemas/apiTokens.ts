// Personal API tokens: a named key for scripts, limited to chosen studies, each with a role no
// higher than the person's own there, that expires and can be revoked.
import { z } from "zod";
import { isoDateSchema, oneLine, uuidSchema } from "./common";
import { studyRoleSchema } from "./studies";

export const API_TOKEN_DEFAULT_DAYS = 90;
export const API_TOKEN_MAX_DAYS = 365;
/** Every token starts with this, so a leaked one is easy to recognise in logs and code. */
export const API_TOKEN_PREFIX = "sieve_";

export const apiTokenCreateSchema = z
  .strictObject({
    name: z.string({ message: "Name is required" }).trim().min(1, "Name is required").max(80, "Name must have at most 80 characters").check(oneLine("Name")),
    studies: z
      .array(z.strictObject({ studyId: uuidSchema, role: studyRoleSchema }), { message: "Choose at least one study" })
      .min(1, "Choose at least one study")
      .max(50, "A token covers at most 50 studies")
      .refine((list) => new Set(list.map((s) => s.studyId)).size === list.length, "Each study may be chosen once"),
    expiresInDays: z
      .number({ message: `Expiry must be a whole number of days from 1 to ${API_TOKEN_MAX_DAYS}` })
      .int(`Expiry must be a whole number of days from 1 to ${API_TOKEN_MAX_DAYS}`)
      .min(1, "Expiry must be at least 1 day")
      .max(API_TOKEN_MAX_DAYS, `Expiry must be at most ${API_TOKEN_MAX_DAYS} days`)
      .default(API_TOKEN_DEFAULT_DAYS),
  })
  .meta({ id: "ApiTokenCreate" });
export type ApiTokenCreateInput = z.input<typeof apiTokenCreateSchema>;

export const apiTokenStatusSchema = z.enum(["active", "expired", "revoked"]);

export const apiTokenSchema = z
  .object({
    id: z.uuid(),
    name: z.string(),
    /** The token's first characters, to tell tokens apart (the whole token is shown once). */
    prefix: z.string(),
    studies: z.array(z.object({ studyId: z.uuid(), studyName: z.string(), role: studyRoleSchema })),
    status: apiTokenStatusSchema,
    createdAt: isoDateSchema,
    expiresAt: isoDateSchema,
    lastUsedAt: isoDateSchema.nullable(),
    revokedAt: isoDateSchema.nullable(),
  })
  .meta({ id: "ApiToken" });
export type ApiToken = z.infer<typeof apiTokenSchema>;

export const apiTokenListSchema = z.object({ tokens: z.array(apiTokenSchema) }).meta({ id: "ApiTokenList" });
export type ApiTokenList = z.infer<typeof apiTokenListSchema>;

export const apiTokenCreatedSchema = z
  .object({
    token: apiTokenSchema,
    secret: z.string().meta({ description: "The token itself: shown this once, send it as `Authorization: Bearer <secret>`" }),
  })
  .meta({ id: "ApiTokenCreated" });
export type ApiTokenCreated = z.infer<typeof apiTokenCreatedSchema>;

export const apiTokenParamsSchema = z.object({ tokenId: uuidSchema });
