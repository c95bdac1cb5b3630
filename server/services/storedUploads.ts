// What the trait-table import and the modern list upload share once a file waits in UPLOAD_DIR:
// reading it back with the separator found at upload, and refusing a mapping with problems.
import { readFile } from "node:fs/promises";
import type { imports } from "../../db/schema/index";
import { parseCsv, type CsvDelimiter, type ParsedCsv } from "../../shared/csv/parse";
import { DomainError, invalidInput } from "../domain/errors";

/** An upload's stored file, parsed again; 409 when the file is no longer kept. */
export async function readStoredUpload(row: Pick<typeof imports.$inferSelect, "storedPath" | "mapping">): Promise<ParsedCsv> {
  const gone = () => new DomainError("conflict", "file_gone", "The uploaded file is no longer kept; upload it again.");
  if (!row.storedPath) throw gone();
  let bytes: Buffer;
  try {
    bytes = await readFile(row.storedPath);
  } catch {
    throw gone();
  }
  const { delimiter } = row.mapping as unknown as { delimiter: CsvDelimiter };
  return parseCsv(new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength), { delimiter });
}

/** 400 naming every field of the mapping that has a problem (as mapping.<field>). */
export function refuseMappingProblems(problems: Record<string, string>): void {
  if (Object.keys(problems).length) {
    throw invalidInput(`Invalid mapping: ${Object.values(problems).join("; ")}`, Object.fromEntries(Object.entries(problems).map(([k, v]) => [`mapping.${k}`, v])));
  }
}
