// Load figures: a real app process (server/index.ts) on the bench database, a study of 10,000
// invented taxa imported through the API, then for 30 s (BENCH_LOAD_SECONDS to shorten) 50
// signed-in clients reading grid pages with filters and sorts while 5 signed-in coders edit
// taxa with a reason, each coder on taxa of its own, sending the row version it last saw.
// Afterwards the coding decisions the coders wrote are counted and every edited taxon's stored
// version and value are compared with what its coder was told: an edit answered 2xx but missing
// from the database is a lost edit. Needs DATABASE_URL (bench/run.ts starts a throwaway cluster);
// runs alone as `DATABASE_URL=... npx tsx bench/load.ts`.
import autocannon, { type AutocannonInstance, type AutocannonRequest } from "autocannon";
import { spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { mkdtempSync, rmSync } from "node:fs";
import { loadavg, tmpdir } from "node:os";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import pg from "pg";
import { freePort } from "../db/cluster";
import { SUGGESTED_CODEBOOK } from "../shared/codebook";
import { mulberry32, pick } from "../scripts/seed/demo/names";
import { quantile } from "./quantile";

export interface LoadFigure {
  name: string;
  value: number;
  unit: string;
  note?: string;
}

const TAXA = 10_000;
const READERS = 50;
const WRITERS = 5;
/** Taxa each coder edits in turn (no two coders share one), so each is edited many times. */
const TAXA_PER_WRITER = 10;
const PASSWORD = "load bench password (invented)";

const taxonName = (i: number) => `Loadella ${String(i).padStart(5, "0")}`;

function inventedCsv(): string {
  const rand = mulberry32(5050);
  const lines = [["name", "higher_taxon", "first_appearance", "last_appearance", ...SUGGESTED_CODEBOOK.map((t) => t.key)].join(",")];
  for (let i = 0; i < TAXA; i++) {
    const fad = 70 + rand() * 30;
    const lad = fad - rand() * 12;
    const values = SUGGESTED_CODEBOOK.map((t) => (rand() < 0.05 ? "" : t.kind === "numeric" ? (1 + rand() * 300).toFixed(1) : pick(rand, t.states).code));
    lines.push([taxonName(i), `Invented clade ${Math.floor(rand() * 40)}`, fad.toFixed(2), lad.toFixed(2), ...values].join(","));
  }
  return lines.join("\n") + "\n";
}

async function startApp(databaseUrl: string, uploadDir: string): Promise<{ url: string; child: ChildProcess; output: string[] }> {
  const port = await freePort();
  const url = `http://127.0.0.1:${port}`;
  const output: string[] = [];
  const child = spawn(process.execPath, ["--import", "tsx", "server/index.ts"], {
    env: {
      ...process.env,
      DATABASE_URL: databaseUrl,
      PORT: String(port),
      HOST: "127.0.0.1",
      APP_URL: url,
      SESSION_SECRET: randomBytes(36).toString("base64url"),
      UPLOAD_DIR: uploadDir,
      JOB_WORKERS: "0",
      LOGIN_LIMIT_PER_IP: "100000",
      LOGIN_LIMIT_PER_ACCOUNT: "100000",
      SIGNUP_LIMIT_PER_IP: "100000",
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  child.stdout!.on("data", (d) => output.push(String(d)));
  child.stderr!.on("data", (d) => output.push(String(d)));
  for (let i = 0; i < 300; i++) {
    if (await fetch(`${url}/api/health`).then((r) => r.ok, () => false)) return { url, child, output };
    if (child.exitCode !== null) break;
    await new Promise((r) => setTimeout(r, 100));
  }
  child.kill("SIGKILL");
  throw new Error(`bench: the app process did not start:\n${output.join("")}`);
}

export async function benchLoad(): Promise<LoadFigure[]> {
  const databaseUrl = process.env.DATABASE_URL;
  if (!databaseUrl) throw new Error("DATABASE_URL is not set: the load bench needs a PostgreSQL database.");
  const seconds = Number(process.env.BENCH_LOAD_SECONDS) > 0 ? Number(process.env.BENCH_LOAD_SECONDS) : 30;
  const uploadDir = mkdtempSync(join(tmpdir(), "stratasieve-load-uploads-"));
  const db = new pg.Pool({ connectionString: databaseUrl, max: 2 });
  const app = await startApp(databaseUrl, uploadDir);
  let studyId: string | null = null;
  const userIds: string[] = [];
  try {
    const call = async (method: string, path: string, cookie: string, body?: unknown) => {
      const res = await fetch(`${app.url}${path}`, {
        method,
        headers: { cookie, origin: app.url, ...(body === undefined ? {} : { "content-type": "application/json" }) },
        body: body === undefined ? undefined : JSON.stringify(body),
      });
      const text = await res.text();
      if (!res.ok) throw new Error(`bench: ${method} ${path} answered ${res.status}: ${text.slice(0, 300)}`);
      return { body: text ? JSON.parse(text) : null, cookie: res.headers.get("set-cookie")?.split(";")[0] ?? "" };
    };
    const account = async (label: string) => {
      const email = `load-${label}-${randomBytes(4).toString("hex")}@example.test`;
      const res = await call("POST", "/api/auth/signup", "", { email, password: PASSWORD, name: `Load ${label} (invented)` });
      userIds.push(res.body.id);
      return { id: res.body.id as string, email, cookie: res.cookie };
    };

    // The study, its codebook (a new study gets the suggested one) and 10,000 taxa through the import.
    const owner = await account("owner");
    studyId = (await call("POST", "/api/studies", owner.cookie, { name: "Invented load study" })).body.id as string;
    const traits = (await call("GET", `/api/studies/${studyId}/traits`, owner.cookie)).body.traits as Array<{ id: string; key: string }>;
    const trait = Object.fromEntries(traits.map((t) => [t.key, t.id]));
    const form = new FormData();
    form.append("file", new Blob([inventedCsv()], { type: "text/csv" }), "invented-load.csv");
    const uploadRes = await fetch(`${app.url}/api/studies/${studyId}/imports`, { method: "POST", headers: { cookie: owner.cookie, origin: app.url }, body: form });
    if (uploadRes.status !== 201) throw new Error(`bench: upload answered ${uploadRes.status}: ${await uploadRes.text()}`);
    const upload = (await uploadRes.json()) as { import: { id: string }; suggestedMapping: unknown };
    const committed = await call("POST", `/api/studies/${studyId}/imports/${upload.import.id}/commit`, owner.cookie, { mapping: upload.suggestedMapping, skipInvalid: false });
    if (committed.body.createdCount !== TAXA) throw new Error(`bench: the import created ${committed.body.createdCount} taxa, not ${TAXA}`);
    await db.query("ANALYZE taxa");

    // Five coders, each signed in once; one reader account signed in once per reading client.
    const coders = [];
    for (let w = 0; w < WRITERS; w++) coders.push(await account(`coder-${w + 1}`));
    const reader = await account("reader");
    await db.query(
      "INSERT INTO memberships (study_id, user_id, role) SELECT $1, u, r::study_role FROM unnest($2::uuid[], $3::text[]) AS m(u, r)",
      [studyId, [...coders.map((c) => c.id), reader.id], [...coders.map(() => "coder"), "viewer"]],
    );
    const readerCookies: string[] = [];
    for (let r = 0; r < READERS; r++) readerCookies.push((await call("POST", "/api/auth/login", "", { email: reader.email, password: PASSWORD })).cookie);

    // Each coder's own taxa, with the version the coder last saw and the value it last set.
    const ids = (await db.query("SELECT id FROM taxa WHERE study_id = $1 ORDER BY name", [studyId])).rows.map((r) => r.id as string);
    const owned = coders.map((_, w) => ids.filter((_, i) => i % WRITERS === w).slice(0, TAXA_PER_WRITER));
    const version = new Map(ids.map((id) => [id, 1]));
    // Every edit by its number: what it set, whether an answer came and whether it was 2xx.
    const sent = new Map<number, { taxonId: string; value: number }>();
    const answered = new Set<number>();
    const succeeded = new Set<number>();
    let editCounter = 0;
    let decisionsAnswered = 0;
    const editFailures = new Map<number, number>();

    // Grid pages: five kinds in turn, pages spread over the first 20.
    let readCounter = 0;
    const gridPath = () => {
      const i = readCounter++;
      const page = 1 + (i % 20);
      const kinds = [
        `sort=name&dir=asc&page=${page}`,
        `filter=${trait.life_habit}:eq:infaunal&sort=${trait.body_size}&dir=desc&page=${1 + (i % 8)}`,
        `filter=name:contains:Loadella 0${String(100 + ((i * 37) % 900)).slice(-3)}&sort=ladMa&dir=asc`,
        `filter=${trait.geographic_range}:min:150&sort=${trait.life_habit}&dir=asc&page=${page}`,
        `filter=${trait.environment}:eq:marine&filter=fadMa:min:80&sort=fadMa&dir=desc&page=${page}`,
      ];
      return `/api/studies/${studyId}/taxa?pageSize=100&${kinds[i % kinds.length].replace(/ /g, "%20")}`;
    };

    const latencies = { read: [] as number[], edit: [] as number[] };
    const counts = { read: { ok: 0, non2xx: 0, errors: 0, timeouts: 0 }, edit: { ok: 0, non2xx: 0, errors: 0, timeouts: 0 } };
    const watch = (instance: AutocannonInstance, kind: "read" | "edit") => {
      instance.on("response", (_client: unknown, status: number, _bytes: number, responseTime: number) => {
        latencies[kind].push(responseTime);
        if (status >= 200 && status < 300) counts[kind].ok++;
        else counts[kind].non2xx++;
      });
      instance.on("reqError", () => counts[kind].errors++);
      return instance;
    };

    const readers = readerCookies.map((cookie) => {
      const request: AutocannonRequest = { method: "GET", setupRequest: (req) => ({ ...req, path: gridPath() }) };
      return watch(autocannon({ url: app.url, connections: 1, duration: seconds, timeout: 30, headers: { cookie }, requests: [request] }), "read");
    });
    const writers = coders.map((coder, w) => {
      const mine = owned[w];
      let turn = 0;
      const request: AutocannonRequest = {
        method: "PATCH",
        setupRequest: (req, context) => {
          const taxonId = mine[turn++ % mine.length];
          const edit = ++editCounter;
          // A value no taxon held before, so every edit changes the row.
          const value = 1000 + edit;
          sent.set(edit, { taxonId, value });
          context.edit = edit;
          return {
            ...req,
            path: `/api/studies/${studyId}/taxa/${taxonId}`,
            body: JSON.stringify({ version: version.get(taxonId), changes: { values: { [trait.body_size]: value } }, reason: `Load bench: remeasured (edit ${edit})` }),
          };
        },
        onResponse: (status, body, context) => {
          const edit = context.edit as number;
          answered.add(edit);
          if (status === 200) {
            const saved = JSON.parse(body) as { taxon: { version: number }; decisions: number };
            version.set(sent.get(edit)!.taxonId, saved.taxon.version);
            succeeded.add(edit);
            decisionsAnswered += saved.decisions;
          } else {
            editFailures.set(status, (editFailures.get(status) ?? 0) + 1);
          }
        },
      };
      return watch(
        autocannon({
          url: app.url,
          connections: 1,
          duration: seconds,
          timeout: 30,
          headers: { cookie: coder.cookie, origin: app.url, "content-type": "application/json" },
          requests: [request],
        }),
        "edit",
      );
    });

    const load = loadavg()[0];
    const started = performance.now();
    const results = await Promise.all([...readers, ...writers]);
    const elapsed = (performance.now() - started) / 1000;
    const load1 = loadavg()[0];
    for (const [i, r] of results.entries()) {
      const kind = i < readers.length ? "read" : "edit";
      counts[kind].timeouts += r.timeouts;
    }

    // What the database holds after the run: the coders' decisions, each naming its edit.
    const decisions = (
      await db.query("SELECT taxon_id, reason FROM coding_decisions WHERE study_id = $1 AND user_id = ANY($2::uuid[]) AND trait_id = $3", [
        studyId,
        coders.map((c) => c.id),
        trait.body_size,
      ])
    ).rows as Array<{ taxon_id: string; reason: string }>;
    const stored = new Set(decisions.map((d) => Number(/\(edit (\d+)\)$/.exec(d.reason)?.[1])));
    // Lost: answered 2xx, not stored. Stored though refused: answered otherwise, yet written.
    const lost = [...succeeded].filter((e) => !stored.has(e)).length;
    const storedThoughRefused = [...answered].filter((e) => !succeeded.has(e) && stored.has(e)).length;
    // Cut off by the end of the run: sent, no answer seen (stored or not, both are fine).
    const unanswered = [...sent.keys()].filter((e) => !answered.has(e));
    const unansweredStored = unanswered.filter((e) => stored.has(e)).length;
    // Each edited taxon: version 1 plus one per stored edit, and the value of its latest stored edit.
    const expected = new Map<string, { version: number; value: number; latest: number }>();
    for (const e of [...stored].sort((a, b) => a - b)) {
      const { taxonId, value } = sent.get(e) ?? { taxonId: "", value: NaN };
      const before = expected.get(taxonId) ?? { version: 1, value: NaN, latest: 0 };
      expected.set(taxonId, { version: before.version + 1, value, latest: e });
    }
    const rows = (await db.query("SELECT id, version, trait_values ->> $2 AS value FROM taxa WHERE id = ANY($1::uuid[])", [[...expected.keys()], trait.body_size])).rows as Array<{
      id: string;
      version: number;
      value: string;
    }>;
    const disagreeing = rows.filter((row) => row.version !== expected.get(row.id)!.version || Number(row.value) !== expected.get(row.id)!.value).length + (expected.size - rows.length);
    const lostEdits = lost + storedThoughRefused + disagreeing;

    const read = [...latencies.read].sort((a, b) => a - b);
    const edit = [...latencies.edit].sort((a, b) => a - b);
    const errors = counts.read.errors + counts.edit.errors + counts.read.timeouts + counts.edit.timeouts;
    const non2xx = counts.read.non2xx + counts.edit.non2xx;
    const how = `${seconds} s, ${READERS} readers + ${WRITERS} coders on ${TAXA.toLocaleString("en-US")} taxa; load average ${load.toFixed(1)} before, ${load1.toFixed(1)} after`;
    const failures = [...editFailures].map(([status, n]) => `${n} x ${status}`).join(", ");
    return [
      { name: "load: grid pages read", value: read.length / elapsed, unit: "req/s", note: `${read.length} pages of 100 rows (5 kinds of filter and sort); ${how}` },
      { name: "load: grid page latency p50", value: quantile(read, 0.5), unit: "ms" },
      { name: "load: grid page latency p95", value: quantile(read, 0.95), unit: "ms" },
      { name: "load: grid page latency p99", value: quantile(read, 0.99), unit: "ms" },
      { name: "load: edits", value: edit.length / elapsed, unit: "req/s", note: `${edit.length} versioned edits with a reason, each coder on ${TAXA_PER_WRITER} taxa of its own` },
      { name: "load: edit latency p50", value: quantile(edit, 0.5), unit: "ms" },
      { name: "load: edit latency p95", value: quantile(edit, 0.95), unit: "ms" },
      { name: "load: edit latency p99", value: quantile(edit, 0.99), unit: "ms" },
      { name: "load: errors (connection, timeout)", value: errors, unit: "count", note: `reads ${counts.read.errors + counts.read.timeouts}, edits ${counts.edit.errors + counts.edit.timeouts}` },
      { name: "load: non-2xx answers", value: non2xx, unit: "count", note: failures ? `edits: ${failures}` : `reads ${counts.read.non2xx}, edits ${counts.edit.non2xx}` },
      { name: "load: edits answered 2xx", value: succeeded.size, unit: "count", note: `the answers reported ${decisionsAnswered} coding decisions` },
      {
        name: "load: coding decisions stored by the edits",
        value: stored.size,
        unit: "count",
        note: `counted in the database afterwards; ${unanswered.length} edits were in flight when the run stopped (${unansweredStored} of them stored)`,
      },
      {
        name: "load: lost edits",
        value: lostEdits,
        unit: "count",
        note: `${lost} answered 2xx but not stored, ${storedThoughRefused} stored though refused, ${disagreeing} of ${expected.size} edited taxa with another version or value than their stored edits give`,
      },
    ];
  } finally {
    app.child.kill("SIGTERM");
    await new Promise((resolve) => (app.child.exitCode !== null ? resolve(null) : app.child.once("exit", resolve)));
    if (studyId) await db.query("DELETE FROM studies WHERE id = $1", [studyId]);
    if (userIds.length) await db.query("DELETE FROM users WHERE id = ANY($1::uuid[])", [userIds]);
    await db.end();
    rmSync(uploadDir, { recursive: true, force: true });
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  benchLoad().then(
    (figures) => {
      for (const f of figures) console.log(`${f.name.padEnd(44)} ${f.value.toFixed(f.unit === "count" ? 0 : 1).padStart(9)} ${f.unit}  ${f.note ?? ""}`);
      process.exit(0);
    },
    (err) => {
      console.error(err);
      process.exit(1);
    },
  );
}
