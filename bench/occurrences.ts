// Timings of deriving ranges and three-timer rates from invented occurrences (seeded, so every run reads the
// same finds). `npx tsx bench/occurrences.ts` prints them; bench/run.ts runs benchOccurrences().
import { randomUUID } from "node:crypto";
import { mkdtemp, readdir, readFile, rm, writeFile } from "node:fs/promises";
import { loadavg, tmpdir } from "node:os";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { eq, sql } from "drizzle-orm";
import { memberships, studies, users } from "../db/schema/index";
import { connectDatabase } from "../server/db";
import { createOccurrenceService } from "../server/services/occurrences";
import { mulberry32, type Random } from "../scripts/seed/demo/names";
import { deriveRanges, threeTimerRates, type Occurrence } from "../shared/occurrences/index";
import { timescaleStages } from "../shared/timescale/index";
import type { BenchFigure } from "./suites";

/**
 * `count` invented finds of `taxa` invented taxa in the Paleozoic and Mesozoic stages: each taxon lives over a
 * run of stages and its finds are dated to one stage (most) or to two neighbouring stages (some).
 */
export function inventedOccurrences(count: number, taxa: number, seed: number): Occurrence[] {
  const random: Random = mulberry32(seed);
  const stages = timescaleStages.filter((s) => s.base <= 485.4 && s.top >= 66).sort((a, b) => b.base - a.base);
  const lives = Array.from({ length: taxa }, () => {
    const first = Math.floor(random() * stages.length);
    const length = 1 + Math.floor(random() * 6);
    return { first, last: Math.min(stages.length - 1, first + length) };
  });
  const occurrences: Occurrence[] = new Array(count);
  for (let i = 0; i < count; i++) {
    const t = Math.floor(random() * taxa);
    const life = lives[t]!;
    const s = life.first + Math.floor(random() * (life.last - life.first + 1));
    const wide = random() < 0.2 && s + 1 < stages.length;
    occurrences[i] = {
      taxon: `Taxon${t}`,
      higherTaxon: `Clade${t % 40}`,
      maxMa: stages[s]!.base,
      minMa: wide ? stages[s + 1]!.top : stages[s]!.top,
      collection: `C${Math.floor(random() * 20_000)}`,
    };
  }
  return occurrences;
}

function median(values: number[]): number {
  return [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)]!;
}

/** Median wall and process CPU time (ms) of `runs` calls after a warm-up; CPU time suffers less from a busy machine. */
function time(runs: number, work: () => void): { ms: number; cpuMs: number } {
  work();
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let r = 0; r < runs; r++) {
    const cpuStart = process.cpuUsage();
    const start = performance.now();
    work();
    wall.push(performance.now() - start);
    const usedCpu = process.cpuUsage(cpuStart);
    cpu.push((usedCpu.user + usedCpu.system) / 1000);
  }
  return { ms: median(wall), cpuMs: median(cpu) };
}

/**
 * CPU seconds the PostgreSQL cluster has used so far (Linux /proc): the postmaster with its exited
 * children, and its live children (the bench's own throwaway cluster serves nobody else). Null where
 * it cannot be read. With the Node process's own CPU time it says how much work the upload costs,
 * which a machine busy with other work does not change as it changes the wall time.
 */
async function postgresCpuSeconds(db: ReturnType<typeof connectDatabase>["db"]): Promise<number | null> {
  try {
    const dir = ((await db.execute(sql`SHOW data_directory`)).rows[0] as { data_directory: string }).data_directory;
    const postmaster = Number((await readFile(join(dir, "postmaster.pid"), "utf8")).split("\n")[0]);
    const ticks = (stat: string) => stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    const own = ticks(await readFile(`/proc/${postmaster}/stat`, "utf8"));
    // Fields after the name: state is 0, ppid 1, utime 11, stime 12, cutime 13, cstime 14.
    let total = Number(own[11]) + Number(own[12]) + Number(own[13]) + Number(own[14]);
    for (const pid of await readdir("/proc")) {
      if (!/^\d+$/.test(pid)) continue;
      const fields = ticks(await readFile(`/proc/${pid}/stat`, "utf8").catch(() => ""));
      if (Number(fields[1]) === postmaster) total += Number(fields[11]) + Number(fields[12]);
    }
    return total / 100; // USER_HZ is 100 on Linux
  } catch {
    return null;
  }
}

/** The invented finds as an occurrence CSV: every fifth dated by interval names instead of ages. */
function occurrenceCsv(occurrences: Occurrence[], stageNameAt: Map<number, string>): string {
  const lines = ["taxon,higher_taxon,max_ma,min_ma,early_interval,late_interval,collection"];
  occurrences.forEach((o, i) => {
    if (i % 5 === 4) lines.push(`${o.taxon},${o.higherTaxon},,,${stageNameAt.get(o.maxMa)},${stageNameAt.get(-o.minMa)},${o.collection}`);
    else lines.push(`${o.taxon},${o.higherTaxon},${o.maxMa},${o.minMa},,,${o.collection}`);
  });
  return lines.join("\n") + "\n";
}

/** Upload (parse, store) and commit (read, check, write in one transaction) of 500,000 occurrences through the service. */
async function benchUploadAndCommit(occurrences: Occurrence[]): Promise<BenchFigure[]> {
  const url = process.env.DATABASE_URL;
  if (!url) return [{ name: "occurrence upload + commit", value: 0, unit: "s", note: "skipped: DATABASE_URL is not set (npm run bench sets it)" }];
  const database = connectDatabase(url);
  const db = database.db;
  const uploadDir = await mkdtemp(join(tmpdir(), "stratasieve-bench-occurrences-"));
  let studyId: string | null = null;
  let userId: string | null = null;
  try {
    const [user] = await db
      .insert(users)
      .values({ email: `bench-${randomUUID()}@example.test`, name: "Bench coder (invented)", passwordHash: "not-a-login" })
      .returning({ id: users.id });
    userId = user!.id;
    const [study] = await db.insert(studies).values({ name: "Invented occurrence bench study", createdBy: userId }).returning({ id: studies.id });
    studyId = study!.id;
    await db.insert(memberships).values({ studyId, userId, role: "coder" });
    const stageNameAt = new Map<number, string>();
    for (const s of timescaleStages) {
      stageNameAt.set(s.base, s.name);
      stageNameAt.set(-s.top, s.name);
    }
    const csv = Buffer.from(occurrenceCsv(occurrences, stageNameAt), "utf8");
    const service = createOccurrenceService(db);
    const postgresBefore = await postgresCpuSeconds(db);
    const nodeBefore = process.cpuUsage();
    const started = performance.now();
    const storedPath = join(uploadDir, `${randomUUID()}.csv`);
    await writeFile(storedPath, csv);
    const uploaded = await service.upload(studyId, { id: userId }, { originalname: "invented-finds.csv", path: storedPath, size: csv.length });
    const afterUpload = performance.now();
    const mapping = {
      taxon: "taxon",
      higherTaxon: "higher_taxon",
      maxMa: "max_ma",
      minMa: "min_ma",
      earlyInterval: "early_interval",
      lateInterval: "late_interval",
      collection: "collection",
      count: null,
    };
    const committed = await service.commit(studyId, uploaded.upload.id, { id: userId }, { mapping, duplicates: "keep", skipInvalid: false });
    const done = performance.now();
    const nodeUsed = process.cpuUsage(nodeBefore);
    const postgresAfter = await postgresCpuSeconds(db);
    const nodeCpu = (nodeUsed.user + nodeUsed.system) / 1e6;
    const postgresCpu = postgresBefore !== null && postgresAfter !== null ? postgresAfter - postgresBefore : null;
    if (committed.createdCount !== occurrences.length) throw new Error(`bench: expected ${occurrences.length} occurrences, the commit wrote ${committed.createdCount}`);
    const derivingStart = performance.now();
    const preview = await service.previewRanges(studyId, { ageMode: "bounds", maxSpanMyr: null });
    const derivingDone = performance.now();
    const mb = (csv.length / 1024 / 1024).toFixed(1);
    return [
      {
        name: "occurrences 500k: upload + commit",
        value: round((done - started) / 1000),
        unit: "s",
        note: `a ${mb} MB CSV, one fifth dated by interval names; target < 30 s; load average ${loadavg()[0]!.toFixed(1)}`,
      },
      {
        name: "occurrences 500k: upload + commit, CPU time",
        value: round(nodeCpu + (postgresCpu ?? 0)),
        unit: "s",
        note: `server process ${round(nodeCpu)} s + PostgreSQL ${postgresCpu === null ? "not readable" : `${round(postgresCpu)} s`}; the work itself, whatever else the machine runs`,
      },
      { name: "occurrences 500k: upload (parse, store)", value: round((afterUpload - started) / 1000), unit: "s" },
      { name: "occurrences 500k: commit (read, check, write)", value: round((done - afterUpload) / 1000), unit: "s", note: "one transaction" },
      {
        name: "occurrences 500k: ranges preview from the database",
        value: round((derivingDone - derivingStart) / 1000),
        unit: "s",
        note: `reads every occurrence, derives ${preview.newTaxa.length} ranges and compares with the table`,
      },
    ];
  } finally {
    if (studyId) await db.delete(studies).where(eq(studies.id, studyId));
    if (userId) await db.delete(users).where(eq(users.id, userId));
    await rm(uploadDir, { recursive: true, force: true });
    await database.close();
  }
}

function round(value: number): number {
  return Math.round(value * 100) / 100;
}

export async function benchOccurrences(): Promise<BenchFigure[]> {
  const count = 500_000;
  const occurrences = inventedOccurrences(count, 20_000, 19);
  const bins = timescaleStages
    .filter((s) => s.base <= 485.4 && s.top >= 66)
    .sort((a, b) => b.base - a.base)
    .map((s) => ({ name: s.name, baseMa: s.base, topMa: s.top }));
  let taxa = 0;
  const derive = time(5, () => {
    taxa = deriveRanges(occurrences, { maxSpanMyr: 30 }).ranges.length;
  });
  const rates = time(5, () => threeTimerRates(occurrences, bins));
  return [
    ...(await benchUploadAndCommit(occurrences)),
    {
      name: "deriveRanges, 500,000 occurrences",
      value: Math.round(derive.ms),
      unit: "ms",
      note: `median of 5 (cpu ${Math.round(derive.cpuMs)} ms); ${taxa} taxa, target < 1000 ms`,
    },
    {
      name: "threeTimerRates, 500,000 occurrences",
      value: Math.round(rates.ms),
      unit: "ms",
      note: `median of 5 (cpu ${Math.round(rates.cpuMs)} ms); ${bins.length} stages, target < 1000 ms`,
    },
  ];
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  void benchOccurrences().then((figures) => {
    for (const figure of figures) console.log(`${figure.name}: ${figure.value} ${figure.unit} (${figure.note})`);
  });
}
