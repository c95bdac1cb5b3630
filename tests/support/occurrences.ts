// Set-up for occurrence API tests: upload an invented occurrence table, and upload + commit in one go.
import type { Response } from "supertest";
import type { OccurrenceMappingInput } from "../../shared/schemas/occurrences";
import type { Cast } from "../api/fixtures";

type Agent = Cast["anonymous"];

export function uploadOccurrences(agent: Agent, studyId: string, content: string, fileName = "invented-finds.csv") {
  return agent.post(`/api/studies/${studyId}/occurrence-uploads`).attach("file", Buffer.from(content, "utf8"), fileName);
}

/** Upload, then commit with the mapping (by default the suggested one); returns both answers. */
export async function commitOccurrences(
  agent: Agent,
  studyId: string,
  content: string,
  opts: { mapping?: OccurrenceMappingInput; skipInvalid?: boolean; duplicates?: "keep" | "drop"; fileName?: string } = {},
): Promise<{ upload: Response; commit: Response; uploadId: string }> {
  const upload = await uploadOccurrences(agent, studyId, content, opts.fileName);
  if (upload.status !== 201) throw new Error(`test setup: upload ${upload.status} ${JSON.stringify(upload.body)}`);
  const uploadId = upload.body.upload.id as string;
  const mapping = opts.mapping ?? Object.fromEntries(Object.entries(upload.body.suggestedMapping).filter(([, v]) => v !== null));
  const commit = await agent
    .post(`/api/studies/${studyId}/occurrence-uploads/${uploadId}/commit`)
    .send({ mapping, skipInvalid: opts.skipInvalid ?? false, duplicates: opts.duplicates ?? "keep" });
  return { upload, commit, uploadId };
}

/** A small valid occurrence table of invented taxa (Maastrichtian to Danian finds). */
export const MATRIX_OCCURRENCES = "taxon,max_ma,min_ma,collection\nMatrixia,70,68,K1\nMatrixia,65,64,K2\n";
