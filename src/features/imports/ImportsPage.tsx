import { useMemo, useState } from "react";
import { can, ROLE_LABELS } from "@shared/roles";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { Notice } from "../../components/Notice";
import { PageHeader } from "../../components/PageHeader";
import { useCurrentStudy } from "../../lib/currentStudy";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useTraits } from "../../lib/queries/codebook";
import { ImportHistory } from "./ImportHistory";
import { ImportWizard } from "./ImportWizard";
import { MissingValuesCard } from "./MissingValuesCard";
import { OccurrenceWizard } from "./occurrences/OccurrenceWizard";
import { RangesFromOccurrences } from "./occurrences/RangesFromOccurrences";

export function ImportsPage() {
  const study = useCurrentStudy();
  useDocumentTitle(`Imports · ${study.name}`);
  const canImport = can(study.role, "imports.run");
  const traits = useTraits(study.id);
  const traitsById = useMemo(() => new Map((traits.data?.traits ?? []).map((t) => [t.id, t])), [traits.data]);
  // An upload chosen in the history to resume at the mapping step; the wizard opens it.
  const [resuming, setResuming] = useState<string | null>(null);

  return (
    <>
      <PageHeader
        eyebrow={study.name}
        title="Imports"
        description="Bring taxa, ranges and trait values in from a CSV file. Every row is checked against the codebook and the time scale before anything is written."
      />
      <div className="space-y-6">
        {!canImport && <Notice>As {ROLE_LABELS[study.role]} you can read the import history. Coders and study leads import and revert files.</Notice>}
        {canImport && traits.isPending && <LoadingState label="Loading the codebook" />}
        {canImport && traits.isError && <ErrorState error={traits.error} title="The codebook could not be loaded" onRetry={() => void traits.refetch()} />}
        <MissingValuesCard studyId={study.id} canEdit={can(study.role, "codebook.edit")} />
        {canImport && traits.isSuccess && <ImportWizard key={resuming ?? "new"} studyId={study.id} traits={traits.data.traits} resumeImportId={resuming} onResumeDone={() => setResuming(null)} />}
        <ImportHistory
          studyId={study.id}
          traits={traitsById}
          canRevert={canImport}
          onResume={(importId) => {
            setResuming(importId);
            window.scrollTo({ top: 0, behavior: "smooth" });
          }}
        />
        {canImport && <OccurrenceWizard studyId={study.id} />}
        <RangesFromOccurrences studyId={study.id} role={study.role} />
      </div>
    </>
  );
}
