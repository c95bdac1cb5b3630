// Personal API tokens. Only a SHA-256 of a token is stored; the token itself is shown once. A token
// works in the studies it lists, with the role it was given there, and never beyond what its owner
// may do in that study now: the route's access check meets both roles on every request.
import { randomBytes } from "node:crypto";
import { and, desc, eq, inArray } from "drizzle-orm";
import type { Database } from "../db";
import { apiTokens, apiTokenStudies, memberships, studies, users } from "../../db/schema/index";
import { ROLE_LABELS, roleCovers, type StudyRole } from "../../shared/roles";
import { API_TOKEN_PREFIX, type ApiToken, type ApiTokenCreated, type ApiTokenCreateInput } from "../../shared/schemas/apiTokens";
import { invalidInput, notFound } from "../domain/errors";
import { hashToken } from "./tokens";

/** Last use is written at most this often per token (a script may send many requests a second). */
const LAST_USED_EVERY_MS = 60_000;

/** What a request made with a token may reach: its owner and, per study, the token's role. */
export interface TokenGrant {
  tokenId: string;
  user: { id: string; email: string; name: string };
  studies: Map<string, StudyRole>;
}

type TokenRow = typeof apiTokens.$inferSelect;

function statusOf(row: TokenRow, now: Date): ApiToken["status"] {
  if (row.revokedAt) return "revoked";
  return row.expiresAt <= now ? "expired" : "active";
}

export function createApiTokenService(db: Database) {
  async function rowsToTokens(rows: TokenRow[]): Promise<ApiToken[]> {
    if (rows.length === 0) return [];
    const scopes = await db
      .select({ tokenId: apiTokenStudies.tokenId, studyId: apiTokenStudies.studyId, role: apiTokenStudies.role, studyName: studies.name })
      .from(apiTokenStudies)
      .innerJoin(studies, eq(studies.id, apiTokenStudies.studyId))
      .where(inArray(apiTokenStudies.tokenId, rows.map((r) => r.id)))
      .orderBy(studies.name);
    const now = new Date();
    return rows.map((row) => ({
      id: row.id,
      name: row.name,
      prefix: row.prefix,
      studies: scopes.filter((s) => s.tokenId === row.id).map((s) => ({ studyId: s.studyId, studyName: s.studyName, role: s.role as StudyRole })),
      status: statusOf(row, now),
      createdAt: row.createdAt.toISOString(),
      expiresAt: row.expiresAt.toISOString(),
      lastUsedAt: row.lastUsedAt?.toISOString() ?? null,
      revokedAt: row.revokedAt?.toISOString() ?? null,
    }));
  }

  return {
    async list(userId: string): Promise<ApiToken[]> {
      return rowsToTokens(await db.select().from(apiTokens).where(eq(apiTokens.userId, userId)).orderBy(desc(apiTokens.createdAt)));
    },

    /** A new token; refused, naming the field, for a study the person is not in or a role above their own there. */
    async create(userId: string, input: Required<Pick<ApiTokenCreateInput, "name" | "studies" | "expiresInDays">>): Promise<ApiTokenCreated> {
      const held = await db
        .select({ studyId: memberships.studyId, role: memberships.role, name: studies.name })
        .from(memberships)
        .innerJoin(studies, eq(studies.id, memberships.studyId))
        .where(and(eq(memberships.userId, userId), inArray(memberships.studyId, input.studies.map((s) => s.studyId))));
      const fields: Record<string, string> = {};
      input.studies.forEach((wanted, i) => {
        const mine = held.find((h) => h.studyId === wanted.studyId);
        if (!mine) fields[`studies.${i}.studyId`] = "You are not a member of this study";
        else if (!roleCovers(mine.role, wanted.role)) {
          fields[`studies.${i}.role`] = `You are ${ROLE_LABELS[mine.role]} in ${mine.name}: a token may not do more than you (choose ${ROLE_LABELS[mine.role]} or a role with fewer rights)`;
        }
      });
      if (Object.keys(fields).length) throw invalidInput(`The token cannot be made: ${Object.values(fields).join("; ")}.`, fields);

      const secret = `${API_TOKEN_PREFIX}${randomBytes(32).toString("base64url")}`;
      const expiresAt = new Date(Date.now() + input.expiresInDays * 86_400_000);
      const row = await db.transaction(async (tx) => {
        const [created] = await tx
          .insert(apiTokens)
          .values({ userId, name: input.name, tokenHash: hashToken(secret), prefix: secret.slice(0, API_TOKEN_PREFIX.length + 6), expiresAt })
          .returning();
        await tx.insert(apiTokenStudies).values(input.studies.map((s) => ({ tokenId: created.id, studyId: s.studyId, role: s.role })));
        return created;
      });
      const [token] = await rowsToTokens([row]);
      return { token, secret };
    },

    async revoke(userId: string, tokenId: string): Promise<void> {
      const [row] = await db
        .update(apiTokens)
        .set({ revokedAt: new Date() })
        .where(and(eq(apiTokens.id, tokenId), eq(apiTokens.userId, userId)))
        .returning({ id: apiTokens.id });
      if (!row) throw notFound("You have no such API token.");
    },

    /** The grant of a live token (not revoked, not expired), or null; notes when it was last used. */
    async resolve(secret: string): Promise<TokenGrant | null> {
      const [row] = await db
        .select({ token: apiTokens, user: { id: users.id, email: users.email, name: users.name } })
        .from(apiTokens)
        .innerJoin(users, eq(users.id, apiTokens.userId))
        .where(eq(apiTokens.tokenHash, hashToken(secret)));
      const now = new Date();
      if (!row || statusOf(row.token, now) !== "active") return null;
      const scopes = await db.select().from(apiTokenStudies).where(eq(apiTokenStudies.tokenId, row.token.id));
      if (!row.token.lastUsedAt || now.getTime() - row.token.lastUsedAt.getTime() > LAST_USED_EVERY_MS) {
        await db.update(apiTokens).set({ lastUsedAt: now }).where(eq(apiTokens.id, row.token.id));
      }
      return { tokenId: row.token.id, user: row.user, studies: new Map(scopes.map((s) => [s.studyId, s.role as StudyRole])) };
    },
  };
}
