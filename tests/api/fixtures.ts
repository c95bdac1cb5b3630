// Shared set-up for API tests: signed-in people in every role of a study, built directly in the
// database where the API path under test is not the point (faster than e-mail round trips).
import request from "supertest";
import { randomUUID } from "node:crypto";
import { apiTokens, apiTokenStudies, invitations, memberships, studies } from "../../db/schema/index";
import { hashToken } from "../../server/services/tokens";
import { STUDY_ROLES, type StudyRole } from "../../shared/roles";
import { signedInAgent, type TestApp } from "../support/server";

export type Person = Awaited<ReturnType<typeof signedInAgent>>;
export type Who = "anonymous" | "stranger" | StudyRole;
export const EVERYONE: Who[] = ["anonymous", "stranger", ...STUDY_ROLES];

export interface Cast {
  people: Record<Exclude<Who, "anonymous">, Person>;
  anonymous: ReturnType<typeof request.agent>;
  /** A new study in which each person holds the role of their name (the stranger holds none). */
  makeStudy(name?: string): Promise<string>;
  /** A pending invitation to the study; returns the raw token the e-mail would carry. */
  makeInvitation(studyId: string, email: string, role?: StudyRole): Promise<string>;
}

export async function castOfRoles(app: TestApp): Promise<Cast> {
  const entries = await Promise.all((["stranger", ...STUDY_ROLES] as const).map(async (who) => [who, await signedInAgent(app, who)] as const));
  const people = Object.fromEntries(entries) as Cast["people"];
  return {
    people,
    anonymous: request.agent(app.app),
    async makeStudy(name = "Invented basin study") {
      const [study] = await app.ctx.db.insert(studies).values({ name, createdBy: people.owner.user.id }).returning();
      await app.ctx.db.insert(memberships).values(STUDY_ROLES.map((role) => ({ studyId: study.id, userId: people[role].user.id, role })));
      return study.id;
    },
    async makeInvitation(studyId, email, role = "viewer") {
      const token = `test-${randomUUID()}-${randomUUID()}`;
      await app.ctx.db.insert(invitations).values({
        studyId,
        email,
        role,
        tokenHash: hashToken(token),
        invitedBy: people.owner.user.id,
        expiresAt: new Date(Date.now() + 3600_000),
      });
      return token;
    },
  };
}

/**
 * A supertest agent that sends a fresh API token of `person` (written straight into the database):
 * covering `studyId` with `role`, or no study at all when studyId is null. No cookie goes along.
 */
export async function tokenAgent(app: TestApp, person: Person, scope: { studyId: string; role: StudyRole } | null) {
  const secret = `sieve_test-${randomUUID()}`;
  const [token] = await app.ctx.db
    .insert(apiTokens)
    .values({ userId: person.user.id, name: "Test token", tokenHash: hashToken(secret), prefix: secret.slice(0, 12), expiresAt: new Date(Date.now() + 3600_000) })
    .returning();
  if (scope) await app.ctx.db.insert(apiTokenStudies).values({ tokenId: token.id, studyId: scope.studyId, role: scope.role });
  return { agent: request.agent(app.app).set("Authorization", `Bearer ${secret}`), secret, tokenId: token.id };
}
