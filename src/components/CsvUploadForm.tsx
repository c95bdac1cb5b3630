import { useState, type FormEvent, type ReactNode } from "react";
import type { UseMutationResult } from "@tanstack/react-query";
import { ApiError, errorMessage } from "../lib/api";
import type { UploadProgress } from "../lib/uploadWithProgress";
import { Button } from "./Button";
import { CsvFileField } from "./CsvFileField";
import { FormError } from "./Notice";
import { ProgressBar } from "./ProgressBar";

export type CsvUploadMutation<T> = UseMutationResult<T, Error, { file: File; onProgress: (p: UploadProgress) => void }>;

export interface CsvUploadFormProps<T> {
  /** The upload's mutation (its own API hook), sent the file with a progress callback. */
  upload: CsvUploadMutation<T>;
  onUploaded: (result: T) => void;
  formLabel: string;
  fieldLabel: string;
  hint: string;
  /** Said when the form is sent without a file, e.g. "Choose a CSV file of species". */
  missingFile: string;
  maxBytes: number;
  maxLabel: string;
  /** Added to the too-large message, e.g. "Split it into smaller files." */
  tooLargeAdvice?: string;
  submitLabel: string;
  /** Shown at the left of the buttons (a template link, a note). */
  aside?: ReactNode;
  onCancel?: () => void;
}

const megabytes = (bytes: number) => `${(bytes / (1024 * 1024)).toFixed(bytes < 10 * 1024 * 1024 ? 1 : 0)} MB`;

/** The first step of every CSV upload: choose a file, check its size here, send it with its progress shown. */
export function CsvUploadForm<T>({ upload, onUploaded, formLabel, fieldLabel, hint, missingFile, maxBytes, maxLabel, tooLargeAdvice, submitLabel, aside, onCancel }: CsvUploadFormProps<T>) {
  const [file, setFile] = useState<File | null>(null);
  const [fileError, setFileError] = useState<string | undefined>();
  const [progress, setProgress] = useState<UploadProgress | null>(null);

  function submit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    if (!file) return setFileError(missingFile);
    if (file.size > maxBytes) return setFileError([`This file is ${megabytes(file.size)}; the limit is ${maxLabel}.`, tooLargeAdvice].filter(Boolean).join(" "));
    if (file.size === 0) return setFileError("This file is empty");
    setProgress({ loaded: 0, total: file.size });
    upload.mutate({ file, onProgress: setProgress }, { onSuccess: onUploaded, onSettled: () => setProgress(null) });
  }
  const sent = progress && progress.total > 0 ? progress.loaded / progress.total : 0;

  return (
    <form noValidate onSubmit={submit} className="space-y-5" aria-label={formLabel}>
      <FormError message={upload.error ? errorMessage(upload.error) : null} />
      <CsvFileField
        label={fieldLabel}
        hint={hint}
        error={fileError ?? (upload.error instanceof ApiError ? upload.error.fields.file : undefined)}
        disabled={upload.isPending}
        onFile={(chosen) => {
          setFile(chosen);
          setFileError(undefined);
          upload.reset();
        }}
      />
      {upload.isPending && (
        <ProgressBar
          label={`Uploading ${file?.name ?? "the file"}`}
          value={sent < 1 ? sent : null}
          detail={sent < 1 ? `${megabytes(progress?.loaded ?? 0)} of ${megabytes(progress?.total ?? 0)}` : "Reading the file…"}
        />
      )}
      <div className="flex flex-col gap-3 sm:flex-row sm:items-center sm:justify-between">
        {aside}
        <div className="flex flex-wrap justify-end gap-3 sm:ml-auto">
          {onCancel && (
            <Button variant="ghost" onClick={onCancel} disabled={upload.isPending}>
              Cancel
            </Button>
          )}
          <Button type="submit" busy={upload.isPending}>
            {submitLabel}
          </Button>
        </div>
      </div>
    </form>
  );
}
