// Trait-table figures: a CSV of 100,000 invented taxa with 10 traits imported through the real
// import service (upload, then commit in one transaction), and grid pages of 100 rows with a
// filter and a sort on that study. Needs DATABASE_URL (bench/run.ts starts a throwaway cluster);
// runs alone as `DATABASE_URL=... npx tsx bench/traitTables.ts`.
import { randomUUID } from "node:crypto";
import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { loadavg, tmpdir } from "node:os";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { eq, sql } from "drizzle-orm";
import { connectDatabase } from "../server/db";
import { memberships, studies, traits, users } from "../db/schema/index";
import { SUGGESTED_CODEBOOK } from "../shared/codebook";
import { createImportService } from "../server/services/traitTableImports";
import { createTaxonService } from "../server/services/taxa";
import { loadCodebook } from "../server/services/codebookStore";
import { taxaListQuerySchema } from "../shared/schemas/taxa";
import type { ImportMapping } from "../shared/schemas/imports";
import { mulberry32, pick } from "../scripts/seed/demo/names";
import { quantile } from "./quantile";

export interface TraitTableFigure {
  name: string;
  value: number;
  unit: string;
  note?: string;
}

const TAXA = 100_000;
const GRID_REQUESTS = 60;
const WARM_UP = 6;

/** Five traits besides the suggested five, so the file has ten trait columns. */
const EXTRA_TRAITS = [
  { key: "mineralogy", label: "Shell mineralogy", kind: "categorical" as const, states: ["calcite", "aragonite", "bimineralic"] },
  { key: "larval_mode", label: "Larval mode", kind: "binary" as const, states: ["planktotrophic", "lecithotrophic"] },
  { key: "motility", label: "Motility", kind: "ordinal" as const, states: ["sessile", "facultative", "mobile"] },
  { key: "abundance", label: "Occurrences", kind: "numeric" as const, states: [] },
  { key: "depth", label: "Water depth", kind: "numeric" as const, states: [] },
];

/** The invented file: one row per taxon, ranges as ages or stage names, every trait filled or left empty. */
function inventedCsv(): string {
  const rand = mulberry32(20260);
  const stages = ["Campanian", "Maastrichtian", "Santonian", "Coniacian", "Turonian"];
  const header = [
    "name",
    "higher_taxon",
    "first_appearance",
    "last_appearance",
    ...SUGGESTED_CODEBOOK.map((t) => t.key),
    ...EXTRA_TRAITS.map((t) => t.key),
  ];
  const lines = [header.join(",")];
  for (let i = 0; i < TAXA; i++) {
    const useStages = rand() < 0.3;
    const fad = 70 + rand() * 30;
    const lad = fad - rand() * 10;
    const cells = [
      `Benchella ${String(i).padStart(6, "0")}`,
      `Invented clade ${Math.floor(rand() * 40)}`,
      useStages ? "Santonian" : fad.toFixed(2),
      useStages ? pick(rand, stages.slice(0, 2)) : lad.toFixed(2),
      ...SUGGESTED_CODEBOOK.map((t) => {
        if (rand() < 0.05) return "";
        if (t.kind === "numeric") return (1 + rand() * 300).toFixed(1);
        return pick(rand, t.states).code;
      }),
      ...EXTRA_TRAITS.map((t) => {
        if (rand() < 0.05) return "";
        if (t.kind === "numeric") return (rand() * 1000).toFixed(0);
        return pick(rand, t.states);
      }),
    ];
    lines.push(cells.join(","));
  }
  return lines.join("\n") + "\n";
}

export async function benchTraitTables(): Promise<TraitTableFigure[]> {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error("DATABASE_URL is not set: the trait-table bench needs a PostgreSQL database.");
  const database = connectDatabase(url);
  const db = database.db;
  const uploadDir = await mkdtemp(join(tmpdir(), "stratasieve-bench-uploads-"));
  const figures: TraitTableFigure[] = [];
  let studyId: string | null = null;
  let userId: string | null = null;
  try {
    const [user] = await db
      .insert(users)
      .values({ email: `bench-${randomUUID()}@example.test`, name: "Bench coder (invented)", passwordHash: "not-a-login" })
      .returning({ id: users.id });
    userId = user.id;
    const [study] = await db.insert(studies).values({ name: "Invented bench study", createdBy: user.id }).returning({ id: studies.id });
    studyId = study.id;
    await db.insert(memberships).values({ studyId, userId: user.id, role: "coder" });
    await db.insert(traits).values([
      ...SUGGESTED_CODEBOOK.map((t, i) => ({ ...t, studyId: study.id, sortOrder: i })),
      ...EXTRA_TRAITS.map((t, i) => ({
        studyId: study.id,
        key: t.key,
        label: t.label,
        kind: t.kind,
        states: t.states.map((code, order) => ({ code, label: code, order })),
        sortOrder: SUGGESTED_CODEBOOK.length + i,
      })),
    ]);
    const codebook = await loadCodebook(db, study.id);
    const mapping: ImportMapping = {
      name: "name",
      higherTaxon: "higher_taxon",
      firstAppearance: "first_appearance",
      lastAppearance: "last_appearance",
      notes: null,
      traits: Object.fromEntries(codebook.map((t) => [t.id, t.key])),
    };

    const csv = Buffer.from(inventedCsv(), "utf8");
    const imports = createImportService(db);
    const started = performance.now();
    // The route's multer streams the file into the upload folder; here it is written there directly.
    const storedPath = join(uploadDir, `${randomUUID()}.csv`);
    await writeFile(storedPath, csv);
    const uploaded = await imports.upload(study.id, user, { originalname: "invented-bench.csv", path: storedPath, size: csv.length });
    const afterUpload = performance.now();
    const committed = await imports.commit(study.id, uploaded.import.id, user, { mapping, skipInvalid: false, reason: "" });
    const done = performance.now();
    if (committed.createdCount !== TAXA) throw new Error(`bench: expected ${TAXA} taxa, the import created ${committed.createdCount}`);
    const mb = (csv.length / 1024 / 1024).toFixed(1);
    // Wall times on a shared machine depend on what else runs: the load average says how busy it was.
    const load = () => `load average ${loadavg()[0].toFixed(1)}`;
    figures.push({ name: "import 100k taxa x 10 traits: total", value: (done - started) / 1000, unit: "s", note: `upload (parse, store) + commit of a ${mb} MB CSV; target < 15 s; ${load()}` });
    figures.push({ name: "import 100k: upload (parse, store)", value: (afterUpload - started) / 1000, unit: "s" });
    figures.push({ name: "import 100k: commit (validate, write)", value: (done - afterUpload) / 1000, unit: "s", note: "one transaction: taxa and one coding decision each" });

    // Let the planner see the new rows, as autovacuum would shortly after a large import.
    await db.execute("ANALYZE taxa");
    const taxa = createTaxonService(db);
    const habit = codebook.find((t) => t.key === "life_habit")!;
    const size = codebook.find((t) => t.key === "body_size")!;
    const range = codebook.find((t) => t.key === "geographic_range")!;
    // Three kinds of grid request, each with a filter and a sort, pages spread over the first 20.
    const scenarios = [
      { name: "state filter + numeric sort", make: (i: number) => ({ filter: `${habit.id}:eq:infaunal`, sort: size.id, dir: "desc", page: String(1 + (i % 20)) }) },
      // A search for a name fragment (100 taxa match each), sorted by last appearance.
      { name: "name search + age sort", make: (i: number) => ({ filter: `name:contains:Benchella 0${String(100 + i * 37).slice(-3)}`, sort: "ladMa", dir: "asc", page: "1" }) },
      { name: "numeric range filter + state sort", make: (i: number) => ({ filter: `${range.id}:min:150`, sort: habit.id, dir: "asc", page: String(1 + (i % 20)) }) },
    ];
    // The first request reads the study's grid columns into this process; later ones only ask the
    // change log what changed since.
    const firstStarted = performance.now();
    await taxa.list(study.id, taxaListQuerySchema.parse({ pageSize: "100" }));
    figures.push({
      name: "grid: first request on the study",
      value: performance.now() - firstStarted,
      unit: "ms",
      note: `reads the study's grid columns into the process once (${TAXA.toLocaleString("en-US")} taxa)`,
    });
    const all: number[] = [];
    const byScenario = new Map<string, number[]>();
    for (let i = 0; i < WARM_UP + GRID_REQUESTS; i++) {
      const scenario = scenarios[i % scenarios.length];
      const query = taxaListQuerySchema.parse({ pageSize: "100", ...scenario.make(Math.floor(i / scenarios.length)) });
      const t0 = performance.now();
      const page = await taxa.list(study.id, query);
      JSON.stringify(page);
      const elapsed = performance.now() - t0;
      if (page.rows.length !== 100) throw new Error(`bench: a grid page (${scenario.name}) held ${page.rows.length} rows`);
      if (i < WARM_UP) continue;
      all.push(elapsed);
      byScenario.set(scenario.name, [...(byScenario.get(scenario.name) ?? []), elapsed]);
    }
    all.sort((a, b) => a - b);
    const note = `${all.length} requests of 100 rows on ${TAXA.toLocaleString("en-US")} taxa, three kinds in turn; service time with the count and JSON`;
    figures.push({ name: "grid page 100 rows, filter + sort: median", value: quantile(all, 0.5), unit: "ms", note });
    figures.push({ name: "grid page 100 rows, filter + sort: p95", value: quantile(all, 0.95), unit: "ms", note: `target < 50 ms; ${load()}` });
    for (const [name, times] of byScenario) {
      times.sort((a, b) => a - b);
      figures.push({ name: `  p95, ${name}`, value: quantile(times, 0.95), unit: "ms", note: `median ${quantile(times, 0.5).toFixed(1)} ms` });
    }
    // Someone else's edit, committed directly: the next page re-reads just that taxon.
    const afterEdit: number[] = [];
    for (let i = 0; i < 20; i++) {
      await db.execute(sql`UPDATE taxa SET trait_values = trait_values || jsonb_build_object(${size.id}::text, ${1000 + i}::float8)
        WHERE id = (SELECT id FROM taxa WHERE study_id = ${study.id} ORDER BY name OFFSET ${i * 97} LIMIT 1)`);
      const t0 = performance.now();
      const page = await taxa.list(study.id, taxaListQuerySchema.parse({ pageSize: "100", ...scenarios[0].make(i) }));
      afterEdit.push(performance.now() - t0);
      if (page.rows.length !== 100) throw new Error(`bench: a grid page after an edit held ${page.rows.length} rows`);
    }
    afterEdit.sort((a, b) => a - b);
    figures.push({ name: "  p95, state filter + numeric sort after an edit", value: quantile(afterEdit, 0.95), unit: "ms", note: `median ${quantile(afterEdit, 0.5).toFixed(1)} ms; 20 pages, each after one taxon changed by another connection` });

    // Finds of the taxa, three each (300,000, one committed occurrence upload): every page counts its rows'
    // finds and collections; a sort by them reads the counts of the whole study once per set of uploads.
    const [{ id: uploadId }] = (
      await db.execute(sql`INSERT INTO imports (study_id, target, file_name, status, progress) VALUES (${study.id}, 'occurrences', 'invented-bench-finds.csv', 'committed', 1) RETURNING id`)
    ).rows as Array<{ id: string }>;
    await db.execute(sql`INSERT INTO occurrences (study_id, upload_id, source_row, taxon, max_ma, min_ma, collection)
      SELECT ${study.id}, ${uploadId}, row_number() OVER () + 1, t.name, 80 - g, 79 - g, 'C' || ((hashtext(t.name) & 1023) + g)
      FROM taxa t CROSS JOIN generate_series(1, 3) g WHERE t.study_id = ${study.id}`);
    await db.execute("ANALYZE occurrences");
    const counted: number[] = [];
    for (let i = 0; i < 20; i++) {
      const t0 = performance.now();
      const page = await taxa.list(study.id, taxaListQuerySchema.parse({ pageSize: "100", page: String(1 + i * 37) }));
      counted.push(performance.now() - t0);
      if (page.rows[0]?.occurrences !== 3) throw new Error(`bench: a grid page counted ${page.rows[0]?.occurrences} finds, not 3`);
    }
    counted.sort((a, b) => a - b);
    figures.push({ name: "grid page 100 rows with finds counted: p95", value: quantile(counted, 0.95), unit: "ms", note: `median ${quantile(counted, 0.5).toFixed(1)} ms; by name, 300,000 finds` });
    const sortStarted = performance.now();
    await taxa.list(study.id, taxaListQuerySchema.parse({ pageSize: "100", sort: "occurrences", dir: "desc" }));
    figures.push({ name: "grid: first page sorted by finds", value: performance.now() - sortStarted, unit: "ms", note: "counts 300,000 finds per taxon once, then keeps them until the uploads change" });
    const bySort: number[] = [];
    for (let i = 0; i < 20; i++) {
      const t0 = performance.now();
      await taxa.list(study.id, taxaListQuerySchema.parse({ pageSize: "100", sort: i % 2 ? "collections" : "occurrences", dir: "desc", page: String(1 + i) }));
      bySort.push(performance.now() - t0);
    }
    bySort.sort((a, b) => a - b);
    figures.push({ name: "  p95, pages sorted by finds or collections", value: quantile(bySort, 0.95), unit: "ms", note: `median ${quantile(bySort, 0.5).toFixed(1)} ms` });
    return figures;
  } finally {
    if (studyId) await db.delete(studies).where(eq(studies.id, studyId));
    if (userId) await db.delete(users).where(eq(users.id, userId));
    await rm(uploadDir, { recursive: true, force: true });
    await database.close();
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  benchTraitTables().then(
    (figures) => {
      for (const f of figures) console.log(`${f.name.padEnd(44)} ${f.value.toFixed(f.unit === "s" ? 2 : 1).padStart(9)} ${f.unit}  ${f.note ?? ""}`);
      process.exit(0);
    },
    (err) => {
      console.error(err);
      process.exit(1);
    },
  );
}
