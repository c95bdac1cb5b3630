// Set-up for trait-table API tests: a study with the suggested codebook (written directly, as a new
// study gets it), and the upload-preview-commit steps of a CSV import.
import type { Response } from "supertest";
import { traits as traitsTable } from "../../db/schema/index";
import { SUGGESTED_CODEBOOK } from "../../shared/codebook";
import type { Trait } from "../../shared/schemas/traits";
import type { ImportMappingInput } from "../../shared/schemas/imports";
import type { Cast } from "../api/fixtures";
import type { TestApp } from "./server";

type Agent = Cast["anonymous"];

export interface CodebookStudy {
  studyId: string;
  /** The suggested codebook's traits by key: environment, life_habit, feeding, body_size, geographic_range. */
  trait: Record<string, Trait>;
}

export async function studyWithCodebook(app: TestApp, cast: Cast, name?: string): Promise<CodebookStudy> {
  const studyId = await cast.makeStudy(name);
  await app.ctx.db.insert(traitsTable).values(SUGGESTED_CODEBOOK.map((t, i) => ({ ...t, studyId, sortOrder: i })));
  const res = await cast.people.owner.agent.get(`/api/studies/${studyId}/traits`);
  if (res.status !== 200) throw new Error(`test setup: traits ${res.status}`);
  return { studyId, trait: Object.fromEntries((res.body.traits as Trait[]).map((t) => [t.key, t])) };
}

export function uploadCsv(agent: Agent, studyId: string, content: string | Buffer, fileName = "invented-taxa.csv") {
  return agent.post(`/api/studies/${studyId}/imports`).attach("file", Buffer.isBuffer(content) ? content : Buffer.from(content, "utf8"), fileName);
}

/** Mapping for files with the template's header names (name, higher_taxon, first_appearance, ...). */
export function templateMapping(study: CodebookStudy, traitKeys: string[] = Object.keys(study.trait)): ImportMappingInput {
  return {
    name: "name",
    higherTaxon: "higher_taxon",
    firstAppearance: "first_appearance",
    lastAppearance: "last_appearance",
    notes: null,
    traits: Object.fromEntries(traitKeys.map((k) => [study.trait[k].id, k])),
  };
}

/** Upload, then commit with the mapping; returns both answers (the commit's may be a refusal). */
export async function importCsv(
  agent: Agent,
  study: CodebookStudy,
  content: string,
  opts: { mapping?: ImportMappingInput; skipInvalid?: boolean; reason?: string } = {},
): Promise<{ upload: Response; commit: Response; importId: string }> {
  const upload = await uploadCsv(agent, study.studyId, content);
  if (upload.status !== 201) throw new Error(`test setup: upload ${upload.status} ${JSON.stringify(upload.body)}`);
  const importId = upload.body.import.id as string;
  const commit = await agent
    .post(`/api/studies/${study.studyId}/imports/${importId}/commit`)
    .send({ mapping: opts.mapping ?? templateMapping(study), skipInvalid: opts.skipInvalid ?? false, ...(opts.reason ? { reason: opts.reason } : {}) });
  return { upload, commit, importId };
}
