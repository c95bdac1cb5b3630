import { and, eq, gt, isNull } from "drizzle-orm";
import type { Database } from "../db";
import { invitations, memberships, studies, users } from "../../db/schema/index";
import { ROLE_LABELS, type StudyRole } from "../../shared/roles";
import type { InvitationPreview } from "../../shared/schemas/studies";
import { DomainError } from "../domain/errors";
import type { Mailer } from "../mail/mailer";
import { invitationMail } from "../mail/templates";
import { hashToken, newToken } from "./tokens";
import { addActivity } from "./activity";

const INVITATION_TTL_MS = 7 * 24 * 3600 * 1000;

const invalid = () => new DomainError("not_found", "invalid_invitation", "This invitation link is invalid, already used or expired. Ask the study lead for a new one.");

export function createInvitationService(db: Database, mailer: Mailer, appUrl: string) {
  async function findLive(token: string) {
    const [row] = await db
      .select({ invitation: invitations, studyName: studies.name, inviter: users.name })
      .from(invitations)
      .innerJoin(studies, eq(studies.id, invitations.studyId))
      .leftJoin(users, eq(users.id, invitations.invitedBy))
      .where(and(eq(invitations.tokenHash, hashToken(token)), isNull(invitations.acceptedAt), gt(invitations.expiresAt, new Date())));
    return row ?? null;
  }

  return {
    async invite(studyId: string, inviter: { id: string; name: string }, email: string, role: StudyRole): Promise<{ id: string }> {
      const study = await db.query.studies.findFirst({ where: eq(studies.id, studyId) });
      if (!study) throw invalid();
      const member = await db
        .select({ id: users.id })
        .from(users)
        .innerJoin(memberships, and(eq(memberships.userId, users.id), eq(memberships.studyId, studyId)))
        .where(eq(users.email, email));
      if (member.length) throw new DomainError("conflict", "already_member", `${email} is already a member of this study.`, { email: "Already a member" });
      const { token, hash } = newToken();
      const expiresAt = new Date(Date.now() + INVITATION_TTL_MS);
      const [row] = await db.insert(invitations).values({ studyId, email, role, tokenHash: hash, invitedBy: inviter.id, expiresAt }).returning();
      const mail = invitationMail({ studyName: study.name, inviter: inviter.name, role, link: `${appUrl}/invitations/${token}`, expiresAt });
      await mailer.send({ to: email, ...mail });
      return { id: row.id };
    },

    async preview(token: string): Promise<InvitationPreview> {
      const row = await findLive(token);
      if (!row) throw invalid();
      return {
        studyName: row.studyName,
        role: row.invitation.role,
        email: row.invitation.email,
        invitedBy: row.inviter,
        expiresAt: row.invitation.expiresAt.toISOString(),
      };
    },

    /**
     * Adds the membership (or keeps an existing one) and spends the token, for the account the
     * invitation was sent to only: a link forwarded or read by someone else is refused untouched.
     */
    async accept(token: string, account: { id: string; email: string }): Promise<{ studyId: string; role: StudyRole }> {
      const userId = account.id;
      return db.transaction(async (tx) => {
        const live = and(eq(invitations.tokenHash, hashToken(token)), isNull(invitations.acceptedAt), gt(invitations.expiresAt, new Date()));
        const [pending] = await tx.select().from(invitations).where(live).for("update");
        if (!pending) throw invalid();
        if (pending.email.toLowerCase() !== account.email.toLowerCase()) {
          throw new DomainError("forbidden",
            "invitation_for_another_address",
            `This invitation is for ${pending.email}, and you are signed in as ${account.email}. Sign in with ${pending.email} (or create an account with it) to accept it.`,
          );
        }
        const [invitation] = await tx
          .update(invitations)
          .set({ acceptedAt: new Date(), acceptedBy: userId })
          .where(and(eq(invitations.id, pending.id), live))
          .returning();
        if (!invitation) throw invalid();
        const existing = await tx.query.memberships.findFirst({
          where: and(eq(memberships.studyId, invitation.studyId), eq(memberships.userId, userId)),
        });
        if (existing) return { studyId: invitation.studyId, role: existing.role };
        await tx.insert(memberships).values({ studyId: invitation.studyId, userId, role: invitation.role });
        const [joiner] = await tx.select({ name: users.name }).from(users).where(eq(users.id, userId));
        await addActivity(tx, {
          studyId: invitation.studyId,
          userId,
          kind: "member.joined",
          summary: `${joiner.name} joined as ${ROLE_LABELS[invitation.role]}`,
          refType: "membership",
          refId: userId,
        });
        return { studyId: invitation.studyId, role: invitation.role };
      });
    },
  };
}
export type InvitationService = ReturnType<typeof createInvitationService>;
