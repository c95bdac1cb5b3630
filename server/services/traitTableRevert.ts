// Reverting a committed trait-table import: the exact previous values come back and the taxa it
// added are removed, each step itself a coding decision; where a value changed since, the revert
// refuses (409) unless told to leave such values as they are.
import { and, eq, inArray } from "drizzle-orm";
import { codingDecisions } from "../../db/schema/index";
import { revertDecisions } from "./decisions";
import { recordActivity } from "./decisionLog";
import type { UploadLifecycle } from "./uploadLifecycle";

export function revertTraitTable(lifecycle: UploadLifecycle, studyId: string, importId: string, user: { id: string }, input: { reason: string; skipChanged: boolean }) {
  return lifecycle.revert(studyId, importId, user, async (tx, upload) => {
    const decisions = await tx
      .select()
      .from(codingDecisions)
      .where(and(eq(codingDecisions.studyId, studyId), eq(codingDecisions.importId, importId), inArray(codingDecisions.action, ["create", "update"])));
    const reason = input.reason || `Revert of the import of ${upload.fileName}`;
    const result = await revertDecisions(tx, studyId, decisions, { userId: user.id, reason, importId, skipChanged: input.skipChanged, skipUndone: true });
    await recordActivity(tx, {
      studyId,
      userId: user.id,
      kind: "import.reverted",
      summary: `Reverted the import of ${upload.fileName}: ${result.reverted} decisions undone${result.skipped ? `, ${result.skipped} left as they are` : ""}`,
      refType: "import",
      refId: importId,
    });
    return result;
  });
}
