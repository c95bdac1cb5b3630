// Set-up for trait-table API tests: a study with the suggested codebook (written directly, as a new
// study gets it), and the upload-preview-commit steps of a CSV import.
import { randomUUID } from "node:crypto";
import type { Response } from "supertest";
import { codingDecisions, taxa as taxaTable, traits as traitsTable } from "../../db/schema/index";
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

// ---------------------------------------------------------------- rows of the role matrix

/** A numeric trait written directly; returns its id. */
export async function codedTrait(app: TestApp, studyId: string): Promise<string> {
  const [row] = await app.ctx.db
    .insert(traitsTable)
    .values({ studyId, key: `matrix_${randomUUID().slice(0, 8)}`, label: "Matrix trait", kind: "numeric", sortOrder: 99 })
    .returning({ id: traitsTable.id });
  return row.id;
}

/** A taxon at version 1 with notes "a", and the decision that wrote the notes; returns both ids. */
export async function codedTaxon(app: TestApp, studyId: string): Promise<{ taxonId: string; decisionId: string; batchId: string }> {
  const [t] = await app.ctx.db
    .insert(taxaTable)
    .values({ studyId, name: `Matrix ${randomUUID()}`, notes: "a" })
    .returning({ id: taxaTable.id });
  const batchId = randomUUID();
  const [d] = await app.ctx.db
    .insert(codingDecisions)
    .values({ studyId, taxonId: t.id, field: "notes", action: "update", oldValue: "", newValue: "a", reason: "matrix", batchId })
    .returning({ id: codingDecisions.id });
  return { taxonId: t.id, decisionId: d.id, batchId };
}

/** An upload by `agent` (the owner in the matrix), committed when asked; returns the import id. */
export async function codedImport(agent: Agent, studyId: string, commit: boolean): Promise<string> {
  const upload = await uploadCsv(agent, studyId, `name\nMatrix ${randomUUID()}\n`);
  if (upload.status !== 201) throw new Error(`test setup: upload ${upload.status}`);
  if (commit) {
    const res = await agent.post(`/api/studies/${studyId}/imports/${upload.body.import.id}/commit`).send({ mapping: { name: "name" }, skipInvalid: false });
    if (res.status !== 200) throw new Error(`test setup: commit ${res.status}`);
  }
  return upload.body.import.id;
}
