import { useEffect, useMemo, useState } from "react";
import type { ImportMapping, ImportPreview, ImportSummary, ImportUpload } from "@shared/schemas/imports";
import type { Trait } from "@shared/schemas/traits";
import { ButtonLink, Button } from "../../components/Button";
import { Card } from "../../components/Card";
import { WizardSteps } from "../../components/WizardSteps";
import { Notice } from "../../components/Notice";
import { pluralize } from "../../lib/format";
import { paths } from "../../lib/paths";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { useDiscardImport, useResumeImport } from "./api";
import { MappingStep } from "./MappingStep";
import { PreviewStep } from "./PreviewStep";
import { UploadStep } from "./UploadStep";

type Stage =
  | { step: "upload" }
  | { step: "map"; upload: ImportUpload; mapping?: ImportMapping }
  | { step: "preview"; upload: ImportUpload; mapping: ImportMapping; preview: ImportPreview }
  | { step: "done"; summary: ImportSummary };

const STEPS = [
  { key: "map", label: "Map the columns" },
  { key: "preview", label: "Check every row" },
  { key: "done", label: "Commit" },
] as const;


/** Upload, map, preview and commit one CSV file; or resume an upload left at the mapping step (chosen in the history). */
export function ImportWizard({ studyId, traits, resumeImportId = null, onResumeDone }: { studyId: string; traits: Trait[]; resumeImportId?: string | null; onResumeDone?: () => void }) {
  const [stage, setStage] = useState<Stage>({ step: "upload" });
  const discard = useDiscardImport(studyId);
  const resume = useResumeImport(studyId);
  const { mutate: resumeUpload } = resume;
  useEffect(() => {
    if (resumeImportId) resumeUpload(resumeImportId, { onSuccess: (upload) => setStage({ step: "map", upload }) });
  }, [resumeImportId, resumeUpload]);
  const traitsById = useMemo(() => new Map(traits.map((t) => [t.id, t])), [traits]);

  function startOver(importId?: string) {
    // The upload was never committed: drop the stored file rather than leave it behind.
    if (importId) discard.mutate(importId);
    setStage({ step: "upload" });
  }

  return (
    <Card title="Import a CSV file" description="Each row is a taxon: its name, higher taxon, range and trait values.">
      <WizardSteps label="Steps of the import" steps={STEPS} current={stage.step === "upload" ? -1 : STEPS.findIndex((s) => s.key === stage.step)} />
      {stage.step === "upload" && resume.isPending && <LoadingState label="Opening the upload again" lines={3} />}
      {stage.step === "upload" && resume.isError && (
        <ErrorState
          error={resume.error}
          title="The upload could not be resumed"
          actions={
            <Button
              variant="secondary"
              onClick={() => {
                resume.reset();
                onResumeDone?.();
              }}
            >
              Upload a file instead
            </Button>
          }
        />
      )}
      {stage.step === "upload" && !resume.isPending && !resume.isError && <UploadStep studyId={studyId} onUploaded={(upload) => setStage({ step: "map", upload })} />}
      {stage.step === "map" && resumeImportId && (
        <Notice title={`Resumed: ${stage.upload.import.fileName}`}>The file as uploaded, with the mapping last checked. Check every row again before committing.</Notice>
      )}
      {stage.step === "map" && (
        <MappingStep
          studyId={studyId}
          upload={stage.upload}
          traits={traits}
          initialMapping={stage.mapping}
          onPreviewed={(mapping, preview) => setStage({ step: "preview", upload: stage.upload, mapping, preview })}
          onStartOver={() => startOver(stage.upload.import.id)}
        />
      )}
      {stage.step === "preview" && (
        <PreviewStep
          studyId={studyId}
          mapping={stage.mapping}
          preview={stage.preview}
          traits={traitsById}
          onBack={() => setStage({ step: "map", upload: stage.upload, mapping: stage.mapping })}
          onCommitted={(summary) => setStage({ step: "done", summary })}
        />
      )}
      {stage.step === "done" && (
        <div className="space-y-4">
          <Notice tone="success" title={`Imported ${stage.summary.fileName}`}>
            {pluralize(stage.summary.createdCount, "taxon added", "taxa added")}, {pluralize(stage.summary.updatedCount, "taxon changed", "taxa changed")}
            {stage.summary.skippedInvalid > 0 && `, ${pluralize(stage.summary.skippedInvalid, "invalid row")} left out`}. The import is listed below and can be reverted there.
          </Notice>
          <div className="flex flex-wrap gap-3">
            <ButtonLink to={`${paths.study(studyId)}/table`}>Open the trait table</ButtonLink>
            <Button variant="secondary" onClick={() => setStage({ step: "upload" })}>
              Import another file
            </Button>
          </div>
        </div>
      )}
    </Card>
  );
}
