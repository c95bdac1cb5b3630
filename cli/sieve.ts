// `sieve`: Stratasieve from a shell, for scripts and pipelines. Every request goes through the
// client generated from the app's OpenAPI document (cli/generated, `npm run api:client`).
// Exit code 0 on success, 1 on any failure (the reason on stderr), 2 on a usage mistake; --json
// prints machine-readable results on stdout.
import { readFileSync, writeFileSync } from "node:fs";
import { basename } from "node:path";
import { parseArgs } from "node:util";
import * as sdk from "./generated/sdk.gen";
import type { Client } from "./generated/client";
import type { ImportMapping, OccurrenceMapping, Run } from "./generated/types.gen";
import { CliError, connect, expectData, loadCredentials, saveCredentials, type Credentials } from "./connection";

const USAGE = `Usage: sieve <command> [options]

Commands
  login --url <address> --token <token>        check the token and remember both
  studies                                       the studies the token covers, with its role in each
  upload <file> --study <id> [--kind traits|occurrences] [--mapping <file.json>] [--commit [--skip-invalid]]
                                                upload a CSV file, show its columns, the mapping used
                                                (the app's suggestion unless given) and every problem
                                                a commit would meet; --commit writes it at once
  problems <upload id> --study <id> --mapping <file.json> [--kind ...]
                                                every problem of an upload, by row and column
  commit <upload id> --study <id> --mapping <file.json> [--kind ...] [--skip-invalid]
                                                write the upload's valid rows, all or nothing
  run --study <id> --params <file.json> [--wait] start a selectivity run; --wait follows it to the end
  wait <run id> --study <id>                    follow a run until it finishes
  export <run id> --study <id> --format csv|json|rerun --out <file>
                                                download a finished run (rerun: the zip for R)

Options
  --json            print results as JSON on stdout
  --url, --token    the app and the token (else SIEVE_URL, SIEVE_TOKEN, or what login saved)
  --help            this text
`;

type Flags = {
  url?: string;
  token?: string;
  study?: string;
  kind?: string;
  mapping?: string;
  params?: string;
  format?: string;
  out?: string;
  json?: boolean;
  wait?: boolean;
  "skip-invalid"?: boolean;
  commit?: boolean;
  help?: boolean;
};

class UsageError extends Error {}

const need = (value: string | undefined, what: string): string => {
  if (!value) throw new UsageError(`Missing ${what}.`);
  return value;
};

function readJsonFile(path: string, what: string): unknown {
  try {
    return JSON.parse(readFileSync(path, "utf8"));
  } catch (err) {
    throw new CliError(`The ${what} file ${path} could not be read as JSON: ${err instanceof Error ? err.message : String(err)}`);
  }
}

/** Prints for people, or the value as JSON with --json. */
function report(flags: Flags, value: unknown, lines: () => string[]): void {
  if (flags.json) process.stdout.write(JSON.stringify(value, null, 2) + "\n");
  else process.stdout.write(lines().join("\n") + "\n");
}

const kindOf = (flags: Flags): "traits" | "occurrences" => {
  const kind = flags.kind ?? "traits";
  if (kind !== "traits" && kind !== "occurrences") throw new UsageError(`--kind must be traits or occurrences, not ${kind}.`);
  return kind;
};

/** The suggested mapping as a mapping: columns the app could not pair are left out. */
function fromSuggestion<T>(suggested: Record<string, unknown>): T {
  return Object.fromEntries(Object.entries(suggested).filter(([, v]) => v !== null && v !== undefined)) as T;
}

function mappingFile(flags: Flags): ImportMapping | OccurrenceMapping {
  return readJsonFile(need(flags.mapping, "--mapping (the column mapping as JSON: `sieve upload` prints the one it used)"), "mapping") as ImportMapping;
}

type Problem = { row: number; column: string | null; message: string; taxon?: string };
const problemLines = (problems: Problem[], total: number) => [
  total === 0 ? "No problems." : `${total} problem${total === 1 ? "" : "s"} (rows as a spreadsheet shows them: the header is row 1):`,
  ...problems.map((p) => `  row ${p.row}${p.column ? `, column ${p.column}` : ""}${p.taxon ? ` (${p.taxon})` : ""}: ${p.message}`),
  ...(total > problems.length ? [`  ... and ${total - problems.length} more`] : []),
];

async function preview(client: Client, flags: Flags, uploadId: string, mapping: ImportMapping | OccurrenceMapping) {
  const study = need(flags.study, "--study");
  if (kindOf(flags) === "occurrences") {
    return expectData(sdk.previewOccurrenceUpload({ client, path: { studyId: study, uploadId }, body: { mapping: mapping as OccurrenceMapping } }));
  }
  return expectData(sdk.previewImport({ client, path: { studyId: study, importId: uploadId }, body: { mapping: mapping as ImportMapping } }));
}

async function commitUpload(client: Client, flags: Flags, studyId: string, uploadId: string, mapping: ImportMapping | OccurrenceMapping) {
  const skipInvalid = flags["skip-invalid"] === true;
  return kindOf(flags) === "occurrences"
    ? expectData(sdk.commitOccurrenceUpload({ client, path: { studyId, uploadId }, body: { mapping: mapping as OccurrenceMapping, skipInvalid } }))
    : expectData(sdk.commitImport({ client, path: { studyId, importId: uploadId }, body: { mapping: mapping as ImportMapping, skipInvalid } }));
}

const committedLine = (c: { fileName: string; validCount: number; createdCount: number; updatedCount: number; skippedInvalid: number }) =>
  `Committed ${c.fileName}: ${c.validCount} valid rows (${c.createdCount} new, ${c.updatedCount} updated, ${c.skippedInvalid} invalid skipped).`;

const commands: Record<string, (args: string[], flags: Flags) => Promise<void>> = {
  async login(_args, flags) {
    const credentials: Credentials = { url: need(flags.url, "--url").replace(/\/$/, ""), token: need(flags.token, "--token") };
    const studies = await expectData(sdk.listStudies({ client: connect(credentials) }));
    const file = saveCredentials(credentials);
    report(flags, { url: credentials.url, studies: studies.studies.length, savedTo: file }, () => [
      `Signed in to ${credentials.url}: the token covers ${studies.studies.length} stud${studies.studies.length === 1 ? "y" : "ies"}. Saved to ${file}.`,
    ]);
  },

  async studies(_args, flags) {
    const { studies } = await expectData(sdk.listStudies({ client: connect(loadCredentials(flags)) }));
    report(flags, studies, () => (studies.length ? studies.map((s) => `${s.id}  ${s.role.padEnd(8)}  ${s.name}`) : ["The token covers no study."]));
  },

  async upload(args, flags) {
    const path = need(args[0], "the file to upload");
    const studyId = need(flags.study, "--study");
    const client = connect(loadCredentials(flags));
    const file = new File([readFileSync(path)], basename(path), { type: "text/csv" });
    const uploaded =
      kindOf(flags) === "occurrences"
        ? await expectData(sdk.uploadOccurrences({ client, path: { studyId }, body: { file } }))
        : await expectData(sdk.uploadTraitTable({ client, path: { studyId }, body: { file } }));
    const summary = "upload" in uploaded ? uploaded.upload : uploaded.import;
    const mapping = flags.mapping ? (readJsonFile(flags.mapping, "mapping") as ImportMapping) : fromSuggestion<ImportMapping>(uploaded.suggestedMapping as Record<string, unknown>);
    const previewed = await preview(client, flags, summary.id, mapping);
    // --commit goes on at once (all or nothing, as the app always commits); otherwise say how to.
    const committed = flags.commit ? await commitUpload(client, flags, studyId, summary.id, mapping) : null;
    report(flags, { upload: summary, columns: uploaded.columns, mapping, preview: previewed, committed }, () => [
      `Uploaded ${summary.fileName}: ${uploaded.rowCount} rows, upload id ${summary.id}.`,
      `Columns: ${uploaded.columns.join(", ")}`,
      `Mapping used: ${JSON.stringify(mapping)}`,
      ...problemLines(previewed.problems as Problem[], previewed.problemCount),
      committed ? committedLine(committed) : `Commit with: sieve commit ${summary.id} --study ${studyId}${flags.kind ? ` --kind ${flags.kind}` : ""} --mapping <the mapping above, saved as JSON>`,
    ]);
  },

  async problems(args, flags) {
    const uploadId = need(args[0], "the upload id");
    const client = connect(loadCredentials(flags));
    const previewed = await preview(client, flags, uploadId, mappingFile(flags));
    report(flags, previewed, () => problemLines(previewed.problems as Problem[], previewed.problemCount));
    if (previewed.problemCount > 0) process.exitCode = 1;
  },

  async commit(args, flags) {
    const uploadId = need(args[0], "the upload id");
    const studyId = need(flags.study, "--study");
    const client = connect(loadCredentials(flags));
    const committed = await commitUpload(client, flags, studyId, uploadId, mappingFile(flags));
    report(flags, committed, () => [committedLine(committed)]);
  },

  async run(_args, flags) {
    const studyId = need(flags.study, "--study");
    const params = readJsonFile(need(flags.params, "--params"), "parameters");
    const client = connect(loadCredentials(flags));
    const started = await expectData(sdk.startRun({ client, path: { studyId }, body: params as never }));
    if (!flags.wait) {
      report(flags, started, () => [`Queued the run “${started.name}”: ${started.id}. Follow it with: sieve wait ${started.id} --study ${studyId}`]);
      return;
    }
    await followRun(client, flags, studyId, started.id);
  },

  async wait(args, flags) {
    const studyId = need(flags.study, "--study");
    await followRun(connect(loadCredentials(flags)), flags, studyId, need(args[0], "the run id"));
  },

  async export(args, flags) {
    const runId = need(args[0], "the run id");
    const studyId = need(flags.study, "--study");
    const out = need(flags.out, "--out");
    const format = flags.format ?? "csv";
    const client = connect(loadCredentials(flags));
    let bytes: Uint8Array;
    if (format === "rerun") {
      const data = await expectData(sdk.downloadRunReplication({ client, path: { studyId, runId }, parseAs: "arrayBuffer" }));
      bytes = new Uint8Array(data as unknown as ArrayBuffer);
    } else if (format === "csv" || format === "json") {
      const data = await expectData(sdk.exportRun({ client, path: { studyId, runId }, query: { format }, parseAs: "text" }));
      bytes = new TextEncoder().encode(data as unknown as string);
    } else {
      throw new UsageError(`--format must be csv, json or rerun, not ${format}.`);
    }
    writeFileSync(out, bytes);
    report(flags, { file: out, bytes: bytes.length }, () => [`Wrote ${out} (${bytes.length.toLocaleString("en-US")} bytes).`]);
  },
};

/** Polls a run, showing its progress on stderr, until it succeeds (exit 0) or fails (exit 1). */
async function followRun(client: Client, flags: Flags, studyId: string, runId: string): Promise<void> {
  const interactive = process.stderr.isTTY === true;
  let last = "";
  for (;;) {
    const run: Run = await expectData(sdk.getRun({ client, path: { studyId, runId } }));
    const line = `${run.status} ${Math.round((run.progress ?? 0) * 100)}%${run.progressNote ? ` ${run.progressNote}` : ""}`;
    if (line !== last) process.stderr.write(interactive ? `\r\x1b[2K${line}` : `${line}\n`);
    last = line;
    if (run.status === "succeeded" || run.status === "failed") {
      if (interactive) process.stderr.write("\n");
      if (run.status === "failed") throw new CliError(`The run failed: ${run.error ?? "no reason given"}`);
      report(flags, run, () => [`The run “${run.name}” finished: ${run.id} (data ${run.dataHashShort ?? "?"}).`]);
      return;
    }
    await new Promise((r) => setTimeout(r, 500));
  }
}

export async function main(argv: string[]): Promise<number> {
  let parsed;
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      options: {
        url: { type: "string" },
        token: { type: "string" },
        study: { type: "string" },
        kind: { type: "string" },
        mapping: { type: "string" },
        params: { type: "string" },
        format: { type: "string" },
        out: { type: "string" },
        json: { type: "boolean" },
        wait: { type: "boolean" },
        "skip-invalid": { type: "boolean" },
        commit: { type: "boolean" },
        help: { type: "boolean" },
      },
    });
  } catch (err) {
    process.stderr.write(`${err instanceof Error ? err.message : String(err)}\n\n${USAGE}`);
    return 2;
  }
  const [name, ...args] = parsed.positionals;
  const flags = parsed.values as Flags;
  if (flags.help || !name) {
    process.stdout.write(USAGE);
    return name || flags.help ? 0 : 2;
  }
  const command = commands[name];
  if (!command) {
    process.stderr.write(`Unknown command: ${name}\n\n${USAGE}`);
    return 2;
  }
  try {
    await command(args, flags);
    return typeof process.exitCode === "number" ? process.exitCode : 0;
  } catch (err) {
    if (err instanceof UsageError) {
      process.stderr.write(`${err.message}\n\n${USAGE}`);
      return 2;
    }
    process.stderr.write(`sieve: ${err instanceof CliError || err instanceof Error ? err.message : String(err)}\n`);
    return 1;
  }
}
