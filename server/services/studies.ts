import { and, count, desc, eq, gt, isNull, sql } from "drizzle-orm";
import type { Database } from "../db";
import { invitations, memberships, studies, traits, users } from "../../db/schema/index";
import { SUGGESTED_CODEBOOK } from "../../shared/codebook";
import { ROLE_LABELS, type StudyRole } from "../../shared/roles";
import type { MainBoundary, Member, Study, StudyUpdateInput } from "../../shared/schemas/studies";
import { findUnit, RANK_ORDER, timescaleUnits } from "../../shared/timescale/index";
import { DomainError, invalidInput, notFound } from "../domain/errors";
import { addActivity } from "./activity";
import { loadImportSettings, saveImportSettings } from "./importSettings";
import type { ImportSettings } from "../../shared/schemas/importChecks";

type StudyRow = typeof studies.$inferSelect;

/** What the newest run (not failed) says about the study's boundary: its crisis boundary, or its first. */
interface LastRunBoundary {
  runId: string;
  runName: string;
  createdAt: string;
  boundaryMa: number | null;
  windowMyr: number | null;
}

/** The choice kept in studies.settings.mainBoundary (no column of its own). */
interface StoredMainBoundary {
  boundaryMa: number;
  unit: string | null;
  setAt: string;
}

/** The narrowest unit of the chart whose base is this age (a stage before an epoch), so the Boundary screen can open it by name. */
function unitWithBase(age: number): string | null {
  const units = timescaleUnits.filter((u) => Math.abs(u.base - age) < 1e-9);
  units.sort((a, b) => RANK_ORDER.indexOf(b.rank) - RANK_ORDER.indexOf(a.rank));
  return units[0]?.name ?? null;
}

/** The main boundary: the later of the choice on the overview and the newest run's crisis boundary. */
function mainBoundaryOf(row: StudyRow, lastRun: LastRunBoundary | null): MainBoundary | null {
  const stored = (row.settings as { mainBoundary?: StoredMainBoundary }).mainBoundary;
  const fromRun: MainBoundary | null =
    lastRun && typeof lastRun.boundaryMa === "number"
      ? {
          boundaryMa: lastRun.boundaryMa,
          unit: unitWithBase(lastRun.boundaryMa),
          windowMyr: typeof lastRun.windowMyr === "number" ? lastRun.windowMyr : null,
          source: "run",
          runId: lastRun.runId,
          runName: lastRun.runName,
          setAt: new Date(lastRun.createdAt).toISOString(),
        }
      : null;
  const fromStudy: MainBoundary | null =
    stored && typeof stored.boundaryMa === "number"
      ? { boundaryMa: stored.boundaryMa, unit: stored.unit ?? null, windowMyr: null, source: "study", runId: null, runName: null, setAt: stored.setAt }
      : null;
  if (fromRun && fromStudy) return Date.parse(fromRun.setAt) > Date.parse(fromStudy.setAt) ? fromRun : fromStudy;
  return fromRun ?? fromStudy;
}

function toStudy(row: StudyRow, role: StudyRole, memberCount: number, lastRun: LastRunBoundary | null = null): Study {
  return {
    id: row.id,
    name: row.name,
    description: row.description,
    role,
    memberCount,
    mainBoundary: mainBoundaryOf(row, lastRun),
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

const memberCountSql = sql<number>`(SELECT count(*)::int FROM memberships m2 WHERE m2.study_id = ${studies.id})`;
// The newest run that did not fail, with the boundary it names the crisis (its first when none is named); runs_study_idx serves it.
// The outer table is named in full: drizzle writes ${studies.id} as a bare "id", which inside this subquery would mean the run's.
const lastRunBoundarySql = sql<LastRunBoundary | null>`(
  SELECT jsonb_build_object(
    'runId', r.id, 'runName', r.name, 'createdAt', r.created_at,
    'boundaryMa', r.params -> 'boundaries' -> COALESCE((r.params ->> 'crisisBoundary')::int, 0) -> 'boundaryMa',
    'windowMyr', r.params -> 'boundaries' -> COALESCE((r.params ->> 'crisisBoundary')::int, 0) -> 'windowMyr')
  FROM runs r WHERE r.study_id = "studies"."id" AND r.status <> 'failed' ORDER BY r.created_at DESC LIMIT 1)`;

export function createStudyService(db: Database) {
  const service = {
    /** The study's declared missing-value tokens (see ./importSettings). */
    importSettings: (studyId: string): Promise<ImportSettings> => loadImportSettings(db, studyId),
    updateImportSettings: (studyId: string, userId: string, input: ImportSettings): Promise<ImportSettings> =>
      db.transaction((tx) => saveImportSettings(tx, studyId, userId, input)),

    async roleOf(studyId: string, userId: string): Promise<StudyRole | null> {
      const row = await db.query.memberships.findFirst({
        where: and(eq(memberships.studyId, studyId), eq(memberships.userId, userId)),
        columns: { role: true },
      });
      return row?.role ?? null;
    },

    async listFor(userId: string): Promise<Study[]> {
      const rows = await db
        .select({ study: studies, role: memberships.role, memberCount: memberCountSql, lastRun: lastRunBoundarySql })
        .from(memberships)
        .innerJoin(studies, eq(studies.id, memberships.studyId))
        .where(eq(memberships.userId, userId))
        .orderBy(desc(studies.updatedAt));
      return rows.map((r) => toStudy(r.study, r.role, Number(r.memberCount), r.lastRun));
    },

    async get(studyId: string, role: StudyRole): Promise<Study> {
      const [row] = await db.select({ study: studies, memberCount: memberCountSql, lastRun: lastRunBoundarySql }).from(studies).where(eq(studies.id, studyId));
      if (!row) throw notFound("Study not found.");
      return toStudy(row.study, role, Number(row.memberCount), row.lastRun);
    },

    /** The creator becomes the study's owner; the codebook starts empty unless the suggested one is asked for. */
    async create(userId: string, input: { name: string; description: string; suggestedCodebook?: boolean }): Promise<Study> {
      const { suggestedCodebook = false, ...fields } = input;
      return db.transaction(async (tx) => {
        const [row] = await tx.insert(studies).values({ ...fields, createdBy: userId }).returning();
        await tx.insert(memberships).values({ studyId: row.id, userId, role: "owner" });
        if (suggestedCodebook) await tx.insert(traits).values(SUGGESTED_CODEBOOK.map((t, i) => ({ ...t, studyId: row.id, sortOrder: i })));
        return toStudy(row, "owner", 1);
      });
    },

    async update(studyId: string, role: StudyRole, input: StudyUpdateInput): Promise<Study> {
      const { mainBoundary, ...fields } = input;
      const changes: Partial<typeof studies.$inferInsert> = { ...fields, updatedAt: new Date() };
      if (mainBoundary === null) {
        changes.settings = sql`${studies.settings} - 'mainBoundary'` as never;
      } else if (mainBoundary !== undefined) {
        const unit = mainBoundary.unit !== undefined ? findUnit(mainBoundary.unit) : undefined;
        if (mainBoundary.unit !== undefined && !unit) throw invalidInput(`"${mainBoundary.unit}" is not a unit of the time scale.`, { "mainBoundary.unit": "Not a unit of the time scale" });
        const stored: StoredMainBoundary = { boundaryMa: unit ? unit.base : (mainBoundary.boundaryMa as number), unit: unit?.name ?? null, setAt: new Date().toISOString() };
        changes.settings = sql`jsonb_set(${studies.settings}, '{mainBoundary}', ${JSON.stringify(stored)}::jsonb)` as never;
      }
      await db.update(studies).set(changes).where(eq(studies.id, studyId));
      return service.get(studyId, role);
    },

    async remove(studyId: string): Promise<void> {
      await db.delete(studies).where(eq(studies.id, studyId));
    },

    async members(studyId: string) {
      const rows = await db
        .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role, joinedAt: memberships.createdAt })
        .from(memberships)
        .innerJoin(users, eq(users.id, memberships.userId))
        .where(eq(memberships.studyId, studyId))
        .orderBy(users.name);
      const members: Member[] = rows.map((r) => ({ ...r, joinedAt: r.joinedAt.toISOString() }));
      const pending = await db
        .select()
        .from(invitations)
        .where(and(eq(invitations.studyId, studyId), isNull(invitations.acceptedAt), gt(invitations.expiresAt, new Date())))
        .orderBy(desc(invitations.createdAt));
      return {
        members,
        invitations: pending.map((i) => ({ id: i.id, email: i.email, role: i.role, expiresAt: i.expiresAt.toISOString(), createdAt: i.createdAt.toISOString() })),
      };
    },

    /**
     * Changes a member's role or removes the member. A study always keeps at least one owner:
     * the owner rows are locked first so two concurrent demotions cannot both pass the check.
     * The change is written to the study's activity feed, naming who made it.
     */
    async changeMembership(studyId: string, userId: string, newRole: StudyRole | null, actor: { id: string; name: string }): Promise<void> {
      await db.transaction(async (tx) => {
        await tx.execute(sql`SELECT 1 FROM memberships WHERE study_id = ${studyId} AND role = 'owner' FOR UPDATE`);
        const current = await tx.query.memberships.findFirst({ where: and(eq(memberships.studyId, studyId), eq(memberships.userId, userId)) });
        if (!current) throw notFound("This person is not a member of the study.");
        if (current.role === "owner" && newRole !== "owner") {
          const [{ owners }] = await tx
            .select({ owners: count() })
            .from(memberships)
            .where(and(eq(memberships.studyId, studyId), eq(memberships.role, "owner")));
          if (owners <= 1) {
            throw new DomainError("conflict", "last_owner", "A study must keep at least one study lead (owner). Make someone else owner first.");
          }
        }
        if (newRole) await tx.update(memberships).set({ role: newRole }).where(and(eq(memberships.studyId, studyId), eq(memberships.userId, userId)));
        else await tx.delete(memberships).where(and(eq(memberships.studyId, studyId), eq(memberships.userId, userId)));
        if (newRole === current.role) return;
        const [member] = await tx.select({ name: users.name }).from(users).where(eq(users.id, userId));
        await addActivity(tx, {
          studyId,
          userId: actor.id,
          kind: newRole ? "member.role_changed" : "member.removed",
          summary: newRole
            ? `${actor.name} changed the role of ${member.name} from ${ROLE_LABELS[current.role]} to ${ROLE_LABELS[newRole]}`
            : `${actor.name} removed ${member.name} (${ROLE_LABELS[current.role]}) from the study`,
          refType: "membership",
          refId: userId,
        });
      });
    },
  };
  return service;
}
export type StudyService = ReturnType<typeof createStudyService>;
