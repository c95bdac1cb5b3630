import { useState, type FormEvent } from "react";
import { importSettingsSchema, MAX_MISSING_TOKENS } from "@shared/schemas/importChecks";
import { Button } from "../../components/Button";
import { Card } from "../../components/Card";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { FormError } from "../../components/Notice";
import { TextArea } from "../../components/TextField";
import { ApiError, errorMessage } from "../../lib/api";
import { useImportSettings, useSaveImportSettings } from "./api";

/** One token a line; blank lines are ignored. */
const linesOf = (text: string) => text.split(/\r?\n/).filter((line) => line.trim() !== "");

/** The first field message of the schema or the server, worded by line ("missingTokens.2" is line 3). */
function tokenMessage(fields: Record<string, string>, lines: string[]): string | undefined {
  for (const [path, message] of Object.entries(fields)) {
    const index = /^missingTokens\.(\d+)$/.exec(path);
    if (index) return `Line ${Number(index[1]) + 1} ("${lines[Number(index[1])]?.trim() ?? ""}"): ${message}`;
    if (path === "missingTokens" || path === "_") return message;
  }
  return undefined;
}

/**
 * The study's missing-value tokens: cell texts such as "Indet." or "?" that every import reads as
 * missing, not as a value or a state. Owners and coders edit them (as the codebook); others read them.
 */
export function MissingValuesCard({ studyId, canEdit }: { studyId: string; canEdit: boolean }) {
  const settings = useImportSettings(studyId);
  const tokens = settings.data?.missingTokens ?? [];
  return (
    <Card
      title="Missing values"
      description='Cell texts every import of this study reads as missing, never as a value or a state: e.g. "Indet.", "?" or "not seen". Empty cells, NA and N/A are always missing. Matched whole, ignoring case and surrounding spaces; each preview lists what it read as missing.'
    >
      {settings.isPending && <LoadingState label="Loading the missing-value tokens" lines={0} className="py-0" />}
      {settings.isError && <ErrorState error={settings.error} title="The missing-value tokens could not be loaded" onRetry={() => void settings.refetch()} />}
      {settings.isSuccess && !canEdit && (
        <p className="text-[15px] text-stone-700">
          {tokens.length ? (
            <>
              Read as missing:{" "}
              {tokens.map((t, i) => (
                <span key={t}>
                  {i > 0 && ", "}
                  <code className="rounded bg-stone-100 px-1">{t}</code>
                </span>
              ))}
              . Coders and study leads change this list.
            </>
          ) : (
            "No tokens declared: only empty cells, NA and N/A are missing. Coders and study leads can declare more."
          )}
        </p>
      )}
      {settings.isSuccess && canEdit && <TokensForm studyId={studyId} initial={tokens} />}
    </Card>
  );
}

/** The editable list, one token a line, checked with the route's own schema before it is sent. */
function TokensForm({ studyId, initial }: { studyId: string; initial: string[] }) {
  const save = useSaveImportSettings(studyId);
  const [text, setText] = useState(initial.join("\n"));
  const [error, setError] = useState<string | undefined>();

  const submit = (event: FormEvent) => {
    event.preventDefault();
    const lines = linesOf(text);
    const parsed = importSettingsSchema.safeParse({ missingTokens: lines });
    if (!parsed.success) {
      const fields: Record<string, string> = {};
      for (const issue of parsed.error.issues) fields[issue.path.join(".") || "_"] ??= issue.message;
      setError(tokenMessage(fields, lines));
      return;
    }
    setError(undefined);
    save.mutate(parsed.data, {
      onError: (e) => {
        if (e instanceof ApiError && Object.keys(e.fields).length) setError(tokenMessage(e.fields, lines));
      },
    });
  };

  return (
    <form onSubmit={submit} noValidate className="space-y-3">
      <TextArea
        label="Missing-value tokens"
        hint={`One a line, at most ${MAX_MISSING_TOKENS}. Previews made after saving read them; preview an open upload again to apply a change.`}
        rows={4}
        value={text}
        error={error}
        onChange={(e) => {
          setText(e.target.value);
          setError(undefined);
          save.reset();
        }}
        spellCheck={false}
      />
      <div className="flex items-center gap-3">
        <Button type="submit" busy={save.isPending}>
          Save tokens
        </Button>
        <span className="text-sm" aria-live="polite">
          {save.isSuccess && <span className="font-medium text-accent-700">Saved.</span>}
        </span>
      </div>
      <FormError message={save.error && !(save.error instanceof ApiError && Object.keys(save.error.fields).length) ? errorMessage(save.error) : null} />
    </form>
  );
}
