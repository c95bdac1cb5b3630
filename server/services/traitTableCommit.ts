// Committing a trait-table file: the valid rows in one transaction (new taxa with their "create"
// decisions, changed taxa with one decision per changed field), or nothing; leaving invalid rows
// out must be asked for. The upload lifecycle claims the import, holds its commit lock and writes
// the progress this reports.
import type { Database } from "../db";
import { studyIntervalLookup } from "./timeBins";
import { mappingProblems } from "../../shared/csv/mapping";
import { IMPORT_MAX_PROBLEMS_LISTED, type ImportCommitInput, type ImportMapping } from "../../shared/schemas/imports";
import type { TraitValue } from "../../shared/schemas/taxa";
import { detailedError, invalidInput } from "../domain/errors";
import { newTaxonState, setField, type TaxonState } from "./taxonModel";
import { loadCodebook } from "./codebookStore";
import { insertTaxaWithDecisions, isUniqueViolation, nameTakenMeanwhile, taxaByName, writeTaxa } from "./taxaStore";
import { insertDecisions, type NewDecision } from "./decisionLog";
import { namesIn, planRow, rememberMapping, traitTableColumns, validateTraitTable } from "./traitTablePlan";
import { prepareImportFile } from "./importChecks";
import { readStoredUpload, refuseMappingProblems, type UploadLifecycle } from "./uploadLifecycle";

/**
 * Writes the valid rows in one transaction. With invalid rows and skipInvalid false nothing is
 * written and the problems are listed (400).
 */
export async function commitTraitTable(
  db: Database,
  lifecycle: UploadLifecycle,
  studyId: string,
  importId: string,
  user: { id: string },
  input: ImportCommitInput & { mapping: ImportMapping },
): Promise<void> {
  await lifecycle.commit(
    studyId,
    importId,
    user,
    async (tx, upload, progress) => {
      const raw = await readStoredUpload(upload);
      const codebook = await loadCodebook(db, studyId);
      refuseMappingProblems(mappingProblems(input.mapping, raw.header, codebook));
      // Read as the preview read it: declared missing-value tokens blanked, chosen spellings merged.
      const { parsed } = await prepareImportFile(tx, studyId, raw, traitTableColumns(input.mapping), { names: input.nameMerges ?? {}, higherTaxa: input.higherTaxonMerges ?? {} });
      const reason = input.reason || `Imported from ${upload.fileName}`;
      // The taxa this file names, locked: an edit in the grid meanwhile waits for the commit.
      const existing = new Map((await taxaByName(tx, studyId, namesIn(parsed, input.mapping), true)).map((s) => [s.name, s]));
      const checked = validateTraitTable(parsed, input.mapping, codebook, existing, await studyIntervalLookup(tx, studyId));
      if (checked.problems.length && !input.skipInvalid) {
        throw detailedError(
          "invalid",
          "import_has_problems",
          `Nothing was imported: ${checked.invalidRowCount} of ${checked.rowCount} rows have problems. Correct them, or choose to skip invalid rows.`,
          { problems: checked.problems.slice(0, IMPORT_MAX_PROBLEMS_LISTED), problemCount: checked.problems.length },
        );
      }
      if (checked.rows.length === 0) throw invalidInput("No valid rows to import.", { file: "No valid rows" });
      const created: TaxonState[] = [];
      const updated: TaxonState[] = [];
      const decisions: NewDecision[] = [];
      for (const p of checked.rows.map((r) => planRow(r, existing.get(r.name) ?? null))) {
        if (!p.existing) {
          const s = newTaxonState(p.row.name);
          // Trait values go straight into the new taxon's one object: setField copies the
          // values for every field, which over 100,000 new taxa of ten traits costs a second.
          for (const c of p.changes) {
            if (c.traitId === null) setField(s, c.field, c.to);
            else if (c.to !== null && c.to !== undefined) s.traitValues[c.traitId] = c.to as TraitValue;
          }
          created.push(s);
        } else if (p.changes.length) {
          for (const c of p.changes) {
            setField(p.existing, c.field, c.to);
            decisions.push({ taxonId: p.existing.id, traitId: c.traitId, field: c.field, action: "update", oldValue: c.from, newValue: c.to, reason, importId, batchId: importId });
          }
          updated.push(p.existing);
        }
      }
      // Progress counts written rows: new taxa with their decisions, changed taxa, their decisions.
      const total = 2 * created.length + updated.length + decisions.length || 1;
      let done = 0;
      const step = async (n: number) => {
        done += n;
        await progress(done / total);
      };
      await insertTaxaWithDecisions(tx, studyId, created, user.id, { reason, importId, batchId: importId }, step);
      await writeTaxa(tx, updated, user.id, step);
      await insertDecisions(tx, studyId, user.id, decisions, step);
      return {
        result: undefined,
        mapping: input.mapping,
        counts: {
          rowCount: checked.rowCount,
          validCount: checked.rows.length,
          errorCount: checked.invalidRowCount,
          createdCount: created.length,
          updatedCount: updated.length,
          skippedInvalid: checked.invalidRowCount,
        },
        activity: {
          kind: "import.committed",
          summary: `Imported ${upload.fileName}: ${created.length} taxa added, ${updated.length} changed${checked.invalidRowCount ? `, ${checked.invalidRowCount} invalid rows skipped` : ""}`,
          refType: "import",
          refId: importId,
        },
      };
    },
    (err) => (isUniqueViolation(err) ? nameTakenMeanwhile() : undefined),
  );
  await rememberMapping(db, studyId, input.mapping);
}
