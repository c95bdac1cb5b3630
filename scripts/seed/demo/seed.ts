// Writes the invented demo study (scripts/seed/demo/generator.ts) into a database, in one transaction:
// demo accounts (one per role), the study and its memberships, the suggested codebook, the trait
// table as one committed import with one coding decision per taxon, a few later edits with
// reasons, threads about coding decisions, the modern species list, the activity feed, and the
// saved analyses (two runs, the list's crosswalk and a modern comparison; scripts/seed/demo/analyses.ts).
// For local use only: it refuses to run when NODE_ENV=production.
import { inArray } from "drizzle-orm";
import type { NodePgDatabase } from "drizzle-orm/node-postgres";
import * as schema from "../../../db/schema/index";
import {
  activity,
  codingDecisions,
  imports,
  memberships,
  modernLists,
  modernSpecies,
  occurrences as occurrencesTable,
  studies,
  taxa as taxaTable,
  threadPosts,
  threads,
  traits as traitsTable,
  users,
} from "../../../db/schema/index";
import { hashPassword } from "../../../server/auth/password";
import { ROLE_LABELS, STUDY_ROLES, type StudyRole } from "../../../shared/roles";
import { generateDemoStudy, INVENTED_NOTE, type DemoStudy, type DemoTaxon, type TraitValues } from "./generator";
import { seedDemoAnalyses, type DemoAnalyses } from "./analyses";
import { DEMO_OCCURRENCE_FILE, generateDemoOccurrences } from "./occurrences";

type Db = NodePgDatabase<typeof schema>;

export interface DemoAccount {
  role: StudyRole;
  email: string;
  name: string;
  /** Printed by `npm start` for local use; the data behind these accounts are invented. */
  password: string;
}

export const DEMO_EMAIL_DOMAIN = "demo.stratasieve.invalid";

/** One account per role. The passwords are public by design: never create them on a production server. */
export const DEMO_ACCOUNTS: readonly DemoAccount[] = [
  { role: "owner", email: `lead@${DEMO_EMAIL_DOMAIN}`, name: "Demo study lead", password: "vessiran-lead-demo" },
  { role: "coder", email: `coder@${DEMO_EMAIL_DOMAIN}`, name: "Demo coder", password: "vessiran-coder-demo" },
  { role: "analyst", email: `analyst@${DEMO_EMAIL_DOMAIN}`, name: "Demo analyst", password: "vessiran-analyst-demo" },
  { role: "reviewer", email: `reviewer@${DEMO_EMAIL_DOMAIN}`, name: "Demo reviewer", password: "vessiran-reviewer-demo" },
  { role: "viewer", email: `guest@${DEMO_EMAIL_DOMAIN}`, name: "Demo guest", password: "vessiran-guest-demo" },
];

/** Throws when the demo must not be created: on a production server its public passwords would be a way in. */
export function assertDemoAllowed(env: { NODE_ENV?: string } = process.env): void {
  if (env.NODE_ENV === "production") {
    throw new Error("The demo study is for local use only and is never created when NODE_ENV=production.");
  }
}

export interface DemoSeedResult {
  studyId: string;
  userIds: Record<StudyRole, string>;
  /** Accounts made by this call; accounts that already existed are reused with their own password. */
  createdAccounts: DemoAccount[];
  counts: { taxa: number; decisions: number; threads: number; posts: number; modernSpecies: number; occurrences: number; runs: number; comparisons: number };
  listId: string;
  /** The two saved runs and the modern comparison. */
  analyses: DemoAnalyses;
}

export interface DemoSeedOptions {
  data?: DemoStudy;
  /** Defaults to DEMO_ACCOUNTS; tests pass their own addresses. */
  accounts?: readonly DemoAccount[];
  env?: { NODE_ENV?: string };
  /** The present moment the invented history is laid out before (it spans the three weeks up to it). */
  now?: Date;
}

const BATCH = 500;

async function insertInBatches<T>(rows: T[], insert: (batch: T[]) => Promise<unknown>): Promise<void> {
  for (let i = 0; i < rows.length; i += BATCH) await insert(rows.slice(i, i + BATCH));
}

type RangeEnd = { ma: number; interval: string | null } | null;
const rangeEnd = (ma: number | null, interval: string | undefined): RangeEnd => (ma === null ? null : { ma, interval: interval ?? null });

/** The later edits of the invented history: what a value was when imported, and why it was changed. */
interface DemoEdit {
  taxonIndex: number;
  field: "trait" | "lad";
  traitKey?: string;
  oldValue: unknown;
  newValue: unknown;
  reason: string;
  role: StudyRole;
  daysBefore: number;
}

/**
 * Picks the taxa the invented history talks about, each a different genus without a planted problem.
 * Each edit ends at the generated value, so the trait table equals the generated data and the planted
 * effects stay exactly as generated.
 */
function demoEdits(data: DemoStudy): { edits: DemoEdit[]; reworkedIndex: number } {
  const { hardHitClade, confoundedLifeHabit, feedingMode } = data.plantedEffects;
  const taken = new Set<number>();
  const find = (what: string, accept: (t: DemoTaxon) => boolean): number => {
    const index = data.taxa.findIndex((t, i) => !taken.has(i) && accept(t));
    if (index < 0) throw new Error(`The demo data hold no ${what}`);
    taken.add(index);
    return index;
  };
  const plain = (t: DemoTaxon) => t.notes === INVENTED_NOTE;
  const infaunalIndex = find(`${confoundedLifeHabit} genus of the ${hardHitClade}`, (t) => plain(t) && t.higherTaxon === hardHitClade && t.values.life_habit === confoundedLifeHabit);
  const depositIndex = find(`${feedingMode}-feeding genus outside the ${hardHitClade}`, (t) => plain(t) && t.higherTaxon !== hardHitClade && t.values.feeding === feedingMode);
  const rangeIndex = find("genus with a long range given in ages", (t) => plain(t) && !t.ladInterval && t.fadMa! - t.ladMa! > 2);
  const reworkedIndex = find("genus with a reworked record", (t) => t.notes.includes("reworked"));
  const range = data.taxa[rangeIndex];
  return {
    reworkedIndex,
    edits: [
      {
        taxonIndex: infaunalIndex,
        field: "trait",
        traitKey: "life_habit",
        oldValue: "epifaunal",
        newValue: confoundedLifeHabit,
        reason: "Articulated specimens sit in life position inside burrow fills of the type section (invented); recoded as infaunal.",
        role: "coder",
        daysBefore: 16,
      },
      {
        taxonIndex: depositIndex,
        field: "trait",
        traitKey: "feeding",
        oldValue: "suspension",
        newValue: feedingMode,
        reason: "Sediment-filled gut traces on two specimens (invented); recoded as a deposit feeder.",
        role: "coder",
        daysBefore: 15,
      },
      {
        taxonIndex: rangeIndex,
        field: "lad",
        // Imported 0.6 Myr older; moved up to the generated age.
        oldValue: rangeEnd(Math.round((range.ladMa! + 0.6) * 100) / 100, undefined),
        newValue: rangeEnd(range.ladMa, undefined),
        reason: "The highest occurrence was re-measured on the corrected section log (invented); last appearance moved up by 0.6 Myr.",
        role: "owner",
        daysBefore: 10,
      },
    ],
  };
}

/** Writes the demo study. Safe to call again: existing demo accounts are reused, and each call makes a new study. */
export async function seedDemo(db: Db, options: DemoSeedOptions = {}): Promise<DemoSeedResult> {
  assertDemoAllowed(options.env);
  const data = options.data ?? generateDemoStudy();
  const accounts = options.accounts ?? DEMO_ACCOUNTS;
  for (const role of STUDY_ROLES) {
    if (!accounts.some((a) => a.role === role)) throw new Error(`The demo needs an account for the role ${role}`);
  }
  const now = options.now ?? new Date();
  const day = 24 * 3600 * 1000;
  const at = (daysBefore: number) => new Date(now.getTime() - daysBefore * day);

  // Hashing is the slow part (argon2, about 50 ms each): only for accounts that do not exist yet.
  const emails = accounts.map((a) => a.email);
  const existing = new Set((await db.select({ email: users.email }).from(users).where(inArray(users.email, emails))).map((u) => u.email));
  const toCreate = accounts.filter((a) => !existing.has(a.email));
  const hashes = await Promise.all(toCreate.map((a) => hashPassword(a.password)));
  const { edits, reworkedIndex } = demoEdits(data);

  return db.transaction(async (tx) => {
    const created = toCreate.length
      ? await tx
          .insert(users)
          .values(toCreate.map((a, i) => ({ email: a.email, name: a.name, passwordHash: hashes[i], createdAt: at(21) })))
          .onConflictDoNothing()
          .returning({ email: users.email })
      : [];
    const userRows = await tx.select({ id: users.id, email: users.email }).from(users).where(inArray(users.email, emails));
    const idByEmail = new Map(userRows.map((u) => [u.email, u.id]));
    const userIds = Object.fromEntries(accounts.map((a) => [a.role, idByEmail.get(a.email)!])) as Record<StudyRole, string>;
    const createdEmails = new Set(created.map((c) => c.email));

    const [study] = await tx
      .insert(studies)
      .values({ ...data.study, createdBy: userIds.owner, createdAt: at(21), updatedAt: at(1), settings: { demo: { seed: data.seed } } })
      .returning({ id: studies.id });
    const studyId = study.id;
    await tx.insert(memberships).values(STUDY_ROLES.map((role) => ({ studyId, userId: userIds[role], role, createdAt: at(role === "owner" ? 21 : 20) })));

    const traitRows = await tx
      .insert(traitsTable)
      .values(data.traits.map((t, i) => ({ ...t, studyId, sortOrder: i, createdAt: at(21), updatedAt: at(21) })))
      .returning({ id: traitsTable.id, key: traitsTable.key });
    const traitId = new Map(traitRows.map((t) => [t.key, t.id]));
    const byTraitId = (values: TraitValues) => Object.fromEntries(Object.entries(values).map(([key, v]) => [traitId.get(key)!, v]));

    // The trait table arrives as one committed import, one coding decision per row.
    const [taxaImport] = await tx
      .insert(imports)
      .values({
        studyId,
        target: "taxa",
        fileName: "vessiran-basin-genera-invented.csv",
        status: "committed",
        mapping: {
          name: "genus",
          higherTaxon: "family",
          firstAppearance: "first_seen",
          lastAppearance: "last_seen",
          notes: "remarks",
          traits: Object.fromEntries(traitRows.map((t) => [t.id, t.key])),
        },
        rowCount: data.taxa.length,
        validCount: data.taxa.length,
        createdCount: data.taxa.length,
        createdBy: userIds.coder,
        createdAt: at(19),
        committedAt: at(19),
      })
      .returning({ id: imports.id });

    // The finds the ranges derive from, as one committed occurrence upload (scripts/seed/demo/occurrences.ts).
    const finds = generateDemoOccurrences(data);
    const [findsUpload] = await tx
      .insert(imports)
      .values({
        studyId,
        target: "occurrences",
        fileName: DEMO_OCCURRENCE_FILE,
        status: "committed",
        mapping: {
          columns: ["genus", "family", "max_ma", "min_ma", "early_interval", "collection"],
          delimiter: ",",
          mapping: { taxon: "genus", higherTaxon: "family", maxMa: "max_ma", minMa: "min_ma", earlyInterval: "early_interval", lateInterval: null, collection: "collection", count: null },
        },
        rowCount: finds.length,
        validCount: finds.length,
        createdCount: finds.length,
        progress: 1,
        createdBy: userIds.coder,
        createdAt: at(18),
        committedAt: at(18),
      })
      .returning({ id: imports.id });
    await insertInBatches(
      finds.map((f, i) => ({ f, i })),
      (batch) =>
        tx.insert(occurrencesTable).values(
          batch.map(({ f, i }) => ({
            studyId,
            uploadId: findsUpload.id,
            // As a spreadsheet numbers the file's rows: the header is row 1.
            sourceRow: i + 2,
            taxon: f.taxon,
            higherTaxon: f.higherTaxon,
            maxMa: f.maxMa,
            minMa: f.minMa,
            earlyInterval: f.earlyInterval,
            lateInterval: f.lateInterval,
            collection: f.collection,
          })),
        ),
    );

    // What each edited value was at import time.
    const importedValues = data.taxa.map((t) => ({ values: { ...t.values }, lad: rangeEnd(t.ladMa, t.ladInterval) }));
    for (const edit of edits) {
      if (edit.field === "trait") importedValues[edit.taxonIndex].values[edit.traitKey!] = edit.oldValue as string;
      else importedValues[edit.taxonIndex].lad = edit.oldValue as RangeEnd;
    }
    const editOf = new Map(edits.map((e) => [e.taxonIndex, e]));
    const taxonIds: string[] = [];
    await insertInBatches(
      data.taxa.map((t, i) => ({ t, i })),
      async (batch) => {
        const rows = await tx
          .insert(taxaTable)
          .values(
            batch.map(({ t, i }) => ({
              studyId,
              name: t.name,
              higherTaxon: t.higherTaxon,
              fadMa: t.fadMa,
              ladMa: t.ladMa,
              fadInterval: t.fadInterval ?? null,
              ladInterval: t.ladInterval ?? null,
              notes: t.notes,
              traitValues: byTraitId(t.values),
              version: editOf.has(i) ? 2 : 1,
              createdAt: at(19),
              updatedAt: at(editOf.get(i)?.daysBefore ?? 19),
              updatedBy: userIds[editOf.get(i)?.role ?? "coder"],
            })),
          )
          .returning({ id: taxaTable.id });
        taxonIds.push(...rows.map((r) => r.id));
      },
    );
    await insertInBatches(
      data.taxa.map((t, i) => ({ t, i })),
      (batch) =>
        tx.insert(codingDecisions).values(
          batch.map(({ t, i }) => ({
            studyId,
            taxonId: taxonIds[i],
            field: "taxon",
            action: "create",
            oldValue: null,
            newValue: {
              name: t.name,
              higherTaxon: t.higherTaxon,
              fad: rangeEnd(t.fadMa, t.fadInterval),
              lad: importedValues[i].lad,
              notes: t.notes,
              values: byTraitId(importedValues[i].values),
            },
            reason: "Imported from vessiran-basin-genera-invented.csv",
            userId: userIds.coder,
            importId: taxaImport.id,
            batchId: taxaImport.id,
            createdAt: at(19),
          })),
        ),
    );
    const editRows = await tx
      .insert(codingDecisions)
      .values(
        edits.map((e) => ({
          studyId,
          taxonId: taxonIds[e.taxonIndex],
          traitId: e.field === "trait" ? traitId.get(e.traitKey!)! : null,
          field: e.field === "trait" ? traitId.get(e.traitKey!)! : "lad",
          action: "update",
          oldValue: e.oldValue,
          newValue: e.newValue,
          reason: e.reason,
          userId: userIds[e.role],
          createdAt: at(e.daysBefore),
        })),
      )
      .returning({ id: codingDecisions.id });

    // Threads about coding decisions: one resolved by the edit it led to, the others open.
    const [infaunalEdit, depositEdit] = edits;
    const infaunalTaxon = data.taxa[infaunalEdit.taxonIndex];
    const depositTaxon = data.taxa[depositEdit.taxonIndex];
    const reworkedTaxon = data.taxa[reworkedIndex];
    const threadSpecs: Array<{
      targetType: string;
      targetId: string;
      traitKey?: string;
      title: string;
      resolvedWith?: string;
      posts: Array<{ role: StudyRole; body: string; daysBefore: number }>;
    }> = [
      {
        targetType: "value",
        targetId: taxonIds[infaunalEdit.taxonIndex],
        traitKey: "life_habit",
        title: `Should ${infaunalTaxon.name} be coded infaunal?`,
        resolvedWith: editRows[0].id,
        posts: [
          {
            role: "reviewer",
            daysBefore: 17,
            body: `${infaunalTaxon.name} came in as epifaunal, but the figured specimens (invented) look like burrowers. What is the evidence either way?`,
          },
          {
            role: "coder",
            daysBefore: 16,
            body: "Specimens sit in life position inside burrow fills (invented record). Recoded as infaunal; the reason is on the decision.",
          },
          { role: "reviewer", daysBefore: 16, body: "Convincing. Most infaunal genera here are in one family, so the analysis should adjust for family." },
        ],
      },
      {
        targetType: "value",
        targetId: taxonIds[depositEdit.taxonIndex],
        traitKey: "feeding",
        title: `${depositTaxon.name}: deposit or suspension feeder?`,
        posts: [
          { role: "reviewer", daysBefore: 14, body: "Gut traces on two specimens seem thin evidence for the whole genus. Are there others?" },
          { role: "coder", daysBefore: 13, body: "Not yet; I will look through the remaining drawers (invented collection) before we freeze the codebook." },
        ],
      },
      {
        targetType: "taxon",
        targetId: taxonIds[reworkedIndex],
        title: `Is the Turonian record of ${reworkedTaxon.name} reworked?`,
        posts: [
          {
            role: "analyst",
            daysBefore: 9,
            body: "Its only find above the boundary is from a channel fill. If it is reworked, the genus belongs with the victims; an outcome override with the reason would say so.",
          },
          { role: "owner", daysBefore: 8, body: "Agreed in principle. Let us check the other channel-fill records first." },
        ],
      },
      {
        targetType: "trait",
        targetId: traitId.get("geographic_range")!,
        title: "Counting regions for genera known from a single section",
        posts: [
          {
            role: "owner",
            daysBefore: 12,
            body: "A genus from one borehole counts as one region. Should regions with only reworked finds count as well?",
          },
          { role: "coder", daysBefore: 11, body: "I left them out so far; the coding rule could say so explicitly." },
        ],
      },
    ];
    const threadRows = await tx
      .insert(threads)
      .values(
        threadSpecs.map((s) => {
          const opened = at(s.posts[0].daysBefore);
          const closed = s.resolvedWith ? at(s.posts[s.posts.length - 1].daysBefore) : null;
          return {
            studyId,
            targetType: s.targetType,
            targetId: s.targetId,
            traitId: s.traitKey ? traitId.get(s.traitKey)! : null,
            title: s.title,
            status: s.resolvedWith ? "resolved" : "open",
            createdBy: userIds[s.posts[0].role],
            createdAt: opened,
            updatedAt: at(s.posts[s.posts.length - 1].daysBefore),
            resolvedAt: closed,
            resolvedBy: s.resolvedWith ? userIds.coder : null,
            resolutionDecisionId: s.resolvedWith ?? null,
          };
        }),
      )
      .returning({ id: threads.id });
    const posts = threadSpecs.flatMap((s, k) =>
      s.posts.map((p) => ({ threadId: threadRows[k].id, authorId: userIds[p.role], body: p.body, createdAt: at(p.daysBefore) })),
    );
    await tx.insert(threadPosts).values(posts);

    // The modern list, as committed from an upload of its own.
    const species = data.modernList.species;
    const columnNames = [...new Set(species.flatMap((s) => Object.keys(s.traits)))];
    const columns = columnNames.map((name) => ({
      name,
      values: [...new Set(species.map((s) => s.traits[name]).filter((v): v is string => v !== undefined))].sort((a, b) =>
        a.localeCompare(b, "en", { numeric: true }),
      ),
    }));
    const [modernImport] = await tx
      .insert(imports)
      .values({
        studyId,
        target: "modern",
        fileName: "vessiran-modern-species-invented.csv",
        status: "committed",
        mapping: { name: "species", higherTaxon: "family", category: "status", traits: columnNames },
        rowCount: species.length,
        validCount: species.length,
        createdCount: species.length,
        createdBy: userIds.analyst,
        createdAt: at(7),
        committedAt: at(7),
      })
      .returning({ id: imports.id });
    const [list] = await tx
      .insert(modernLists)
      .values({
        studyId,
        name: data.modernList.name,
        importId: modernImport.id,
        speciesCount: species.length,
        columns,
        crosswalk: {},
        createdBy: userIds.analyst,
        createdAt: at(7),
        updatedAt: at(7),
      })
      .returning({ id: modernLists.id });
    await insertInBatches(species, (batch) =>
      tx.insert(modernSpecies).values(batch.map((s) => ({ listId: list.id, name: s.name, higherTaxon: s.higherTaxon, category: s.category, rawTraits: s.traits }))),
    );

    const memberName = (role: StudyRole) => accounts.find((a) => a.role === role)!.name;
    await tx.insert(activity).values([
      { studyId, userId: userIds.owner, kind: "study.created", summary: `${memberName("owner")} created the study`, refType: "study", refId: studyId, createdAt: at(21) },
      ...STUDY_ROLES.filter((r) => r !== "owner").map((role) => ({
        studyId,
        userId: userIds[role],
        kind: "member.joined",
        summary: `${memberName(role)} joined as ${ROLE_LABELS[role]}`,
        refType: "membership",
        refId: userIds[role],
        createdAt: at(20),
      })),
      {
        studyId,
        userId: userIds.coder,
        kind: "import.committed",
        summary: `${memberName("coder")} imported ${data.taxa.length.toLocaleString("en-US")} taxa from vessiran-basin-genera-invented.csv`,
        refType: "import",
        refId: taxaImport.id,
        createdAt: at(19),
      },
      ...threadSpecs.map((s, k) => ({
        studyId,
        userId: userIds[s.posts[0].role],
        kind: "thread.opened",
        summary: `${memberName(s.posts[0].role)} opened "${s.title}"`,
        refType: "thread",
        refId: threadRows[k].id,
        createdAt: at(s.posts[0].daysBefore),
      })),
      ...threadSpecs.flatMap((s, k) =>
        s.resolvedWith
          ? [
              {
                studyId,
                userId: userIds.coder,
                kind: "thread.resolved",
                summary: `${memberName("coder")} resolved "${s.title}"`,
                refType: "thread",
                refId: threadRows[k].id,
                createdAt: at(s.posts[s.posts.length - 1].daysBefore),
              },
            ]
          : [],
      ),
      {
        studyId,
        userId: userIds.coder,
        kind: "occurrences.committed",
        summary: `Uploaded ${finds.length.toLocaleString("en-US")} invented occurrences from ${DEMO_OCCURRENCE_FILE}; the genera's ranges derive from them`,
        refType: "import",
        refId: findsUpload.id,
        createdAt: at(18),
      },
      {
        studyId,
        userId: userIds.analyst,
        kind: "modern_list.added",
        summary: `${memberName("analyst")} uploaded the modern list "${data.modernList.name}" (${species.length} species)`,
        refType: "modern_list",
        refId: list.id,
        createdAt: at(7),
      },
    ]);

    // The services read and write through this transaction as through a database, so a failure
    // anywhere leaves nothing behind.
    const analyses = await seedDemoAnalyses(tx as unknown as Db, {
      data,
      studyId,
      listId: list.id,
      analystId: userIds.analyst,
      traitIdByKey: traitId,
      listColumns: columns,
      at,
    });

    return {
      studyId,
      userIds,
      createdAccounts: accounts.filter((a) => createdEmails.has(a.email)),
      counts: {
        taxa: taxonIds.length,
        decisions: data.taxa.length + editRows.length,
        threads: threadRows.length,
        posts: posts.length,
        modernSpecies: species.length,
        occurrences: finds.length,
        runs: 2,
        comparisons: 1,
      },
      listId: list.id,
      analyses,
    };
  });
}
