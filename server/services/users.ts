import { and, eq, gt, isNull, ne } from "drizzle-orm";
import type { Database } from "../db";
import { passwordResets, sessions, users } from "../../db/schema/index";
import type { SignupInput, User } from "../../shared/schemas/auth";
import { DomainError, notFound } from "../domain/errors";
import { dummyVerify, hashPassword, verifyPassword } from "../auth/password";
import { hashToken, newToken } from "./tokens";

const RESET_TTL_MS = 60 * 60 * 1000;

export function toUser(row: typeof users.$inferSelect): User {
  return { id: row.id, email: row.email, name: row.name, createdAt: row.createdAt.toISOString() };
}

export function createUserService(db: Database) {
  return {
    /**
     * Creates the account, or returns null when the e-mail already has one: the caller answers
     * the same either way (the password is hashed either way too, so both take as long).
     */
    async signup(input: SignupInput): Promise<User | null> {
      const passwordHash = await hashPassword(input.password);
      const [row] = await db
        .insert(users)
        .values({ email: input.email, name: input.name, passwordHash })
        .onConflictDoNothing()
        .returning();
      return row ? toUser(row) : null;
    },

    async authenticate(email: string, password: string): Promise<User> {
      const row = await db.query.users.findFirst({ where: eq(users.email, email) });
      const ok = row ? await verifyPassword(row.passwordHash, password) : await dummyVerify(password);
      if (!row || !ok) throw new DomainError("unauthenticated", "invalid_credentials", "The e-mail or the password is not right.");
      return toUser(row);
    },

    async get(userId: string): Promise<User> {
      const row = await db.query.users.findFirst({ where: eq(users.id, userId) });
      if (!row) throw notFound("Account not found.");
      return toUser(row);
    },

    async findByEmail(email: string) {
      return db.query.users.findFirst({ where: eq(users.email, email) });
    },

    async updateName(userId: string, name: string): Promise<User> {
      const [row] = await db.update(users).set({ name }).where(eq(users.id, userId)).returning();
      return toUser(row);
    },

    async createSession(userId: string, expiresAt: Date): Promise<string> {
      const [row] = await db.insert(sessions).values({ userId, expiresAt }).returning({ id: sessions.id });
      return row.id;
    },

    async liveSessionUser(sessionId: string, userId: string) {
      const rows = await db
        .select({ id: users.id, email: users.email, name: users.name })
        .from(sessions)
        .innerJoin(users, eq(users.id, sessions.userId))
        .where(and(eq(sessions.id, sessionId), eq(sessions.userId, userId), isNull(sessions.revokedAt), gt(sessions.expiresAt, new Date())))
        .limit(1);
      return rows[0] ?? null;
    },

    async endSession(sessionId: string): Promise<void> {
      await db.update(sessions).set({ revokedAt: new Date() }).where(eq(sessions.id, sessionId));
    },

    /** Changing a password ends every other session of the user. */
    async changePassword(userId: string, currentSessionId: string, currentPassword: string, newPassword: string): Promise<void> {
      const row = await db.query.users.findFirst({ where: eq(users.id, userId) });
      if (!row) throw new DomainError("unauthenticated", "unauthorized", "Sign in to continue.");
      if (!(await verifyPassword(row.passwordHash, currentPassword))) {
        throw new DomainError("invalid", "validation_failed", "The current password is not right.", { currentPassword: "The current password is not right" });
      }
      const passwordHash = await hashPassword(newPassword);
      await db.transaction(async (tx) => {
        await tx.update(users).set({ passwordHash }).where(eq(users.id, userId));
        await tx
          .update(sessions)
          .set({ revokedAt: new Date() })
          .where(and(eq(sessions.userId, userId), ne(sessions.id, currentSessionId), isNull(sessions.revokedAt)));
      });
    },

    /** Returns a raw token to e-mail, or null when no account has this e-mail (the caller says nothing). */
    async createPasswordReset(email: string): Promise<{ token: string; userId: string } | null> {
      const row = await db.query.users.findFirst({ where: eq(users.email, email) });
      if (!row) return null;
      const { token, hash } = newToken();
      await db.insert(passwordResets).values({ userId: row.id, tokenHash: hash, expiresAt: new Date(Date.now() + RESET_TTL_MS) });
      return { token, userId: row.id };
    },

    /** Sets the new password, spends the token and ends every session of the account. */
    async confirmPasswordReset(token: string, newPassword: string): Promise<void> {
      const passwordHash = await hashPassword(newPassword);
      await db.transaction(async (tx) => {
        const [reset] = await tx
          .update(passwordResets)
          .set({ usedAt: new Date() })
          .where(and(eq(passwordResets.tokenHash, hashToken(token)), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, new Date())))
          .returning();
        if (!reset) throw new DomainError("invalid", "invalid_token", "This reset link is invalid, already used or older than one hour. Ask for a new one.");
        await tx.update(users).set({ passwordHash }).where(eq(users.id, reset.userId));
        await tx.update(sessions).set({ revokedAt: new Date() }).where(and(eq(sessions.userId, reset.userId), isNull(sessions.revokedAt)));
      });
    },
  };
}
export type UserService = ReturnType<typeof createUserService>;
