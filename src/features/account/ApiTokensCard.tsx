import { useState, type FormEvent } from "react";
import { useQuery } from "@tanstack/react-query";
import { API_TOKEN_DEFAULT_DAYS, API_TOKEN_MAX_DAYS, apiTokenCreateSchema, type ApiToken, type ApiTokenCreated } from "@shared/schemas/apiTokens";
import { ROLE_LABELS, roleCovers, STUDY_ROLES, type StudyRole } from "@shared/roles";
import { Button } from "../../components/Button";
import { Card } from "../../components/Card";
import { ConfirmDialog } from "../../components/ConfirmDialog";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { FormError, Notice } from "../../components/Notice";
import { TextField } from "../../components/TextField";
import { formatDate, formatDateTime } from "../../lib/format";
import { formLevelMessage, issuesToFieldErrors, type FieldErrors } from "../../lib/forms";
import { ApiError } from "../../lib/api";
import { studiesQuery } from "../../lib/queries/study";
import { useApiTokens, useCreateApiToken, useRevokeApiToken } from "./api";

const STATUS_WORDS: Record<ApiToken["status"], string> = { active: "Active", expired: "Expired", revoked: "Revoked" };

/** Personal API tokens for scripts: made for chosen studies, shown once, revocable. */
export function ApiTokensCard() {
  const tokens = useApiTokens();
  const [created, setCreated] = useState<ApiTokenCreated | null>(null);
  return (
    <Card
      title="API tokens"
      description="Keys for scripts and the command line, sent as “Authorization: Bearer …”. A token works only in the studies you choose, never with more rights than you have there, and never changes your account."
    >
      {created && <NewTokenNotice created={created} onDone={() => setCreated(null)} />}
      <NewTokenForm onCreated={setCreated} />
      <h3 className="mt-8 mb-3 text-sm font-semibold text-stone-900">Your tokens</h3>
      {tokens.isPending && <LoadingState label="Loading your API tokens" />}
      {tokens.isError && <ErrorState error={tokens.error} title="Your API tokens could not be loaded" onRetry={() => void tokens.refetch()} />}
      {tokens.isSuccess && tokens.data.length === 0 && <p className="text-sm text-stone-600">No tokens yet. A script with a token can upload files, start runs and download their results.</p>}
      {tokens.isSuccess && tokens.data.length > 0 && <TokenList tokens={tokens.data} />}
    </Card>
  );
}

function NewTokenNotice({ created, onDone }: { created: ApiTokenCreated; onDone: () => void }) {
  const [copied, setCopied] = useState(false);
  return (
    <Notice tone="success" title={`Token “${created.token.name}” made`} className="mb-6">
      <p>Copy it now: it is shown only this once. Stratasieve keeps only a fingerprint of it.</p>
      <div className="mt-3 flex flex-wrap items-center gap-2">
        <code data-testid="new-api-token" className="rounded bg-white px-2 py-1 font-mono text-xs break-all text-stone-900 ring-1 ring-stone-200">
          {created.secret}
        </code>
        <Button
          size="sm"
          variant="secondary"
          onClick={() => void navigator.clipboard?.writeText(created.secret).then(() => setCopied(true), () => setCopied(false))}
        >
          {copied ? "Copied" : "Copy"}
        </Button>
        <Button size="sm" variant="ghost" onClick={onDone}>
          I have copied it
        </Button>
      </div>
    </Notice>
  );
}

function NewTokenForm({ onCreated }: { onCreated: (created: ApiTokenCreated) => void }) {
  const studies = useQuery(studiesQuery());
  const create = useCreateApiToken();
  const [name, setName] = useState("");
  const [days, setDays] = useState(String(API_TOKEN_DEFAULT_DAYS));
  const [chosen, setChosen] = useState<Record<string, StudyRole | undefined>>({});
  const [errors, setErrors] = useState<FieldErrors>({});
  const list = studies.data ?? [];

  const submit = (event: FormEvent<HTMLFormElement>) => {
    event.preventDefault();
    const picked = list.filter((s) => chosen[s.id]);
    const input = { name, expiresInDays: Number(days), studies: picked.map((s) => ({ studyId: s.id, role: chosen[s.id]! })) };
    const parsed = apiTokenCreateSchema.safeParse(input);
    if (!parsed.success) return setErrors(issuesToFieldErrors(parsed.error));
    setErrors({});
    create.mutate(parsed.data, {
      onSuccess: (result) => {
        onCreated(result);
        setName("");
        setChosen({});
        setDays(String(API_TOKEN_DEFAULT_DAYS));
      },
      onError: (error) => {
        if (error instanceof ApiError) setErrors(error.fields);
      },
    });
  };

  if (studies.isPending) return <LoadingState label="Loading your studies" />;
  if (studies.isError) return <ErrorState error={studies.error} title="Your studies could not be loaded" onRetry={() => void studies.refetch()} />;
  if (list.length === 0) return <p className="text-sm text-stone-600">A token works in studies you belong to; you belong to none yet.</p>;
  const studiesError = errors.studies ?? Object.entries(errors).find(([k]) => k.startsWith("studies."))?.[1];

  return (
    <form noValidate onSubmit={submit} className="space-y-5" aria-label="New API token">
      <FormError message={formLevelMessage(create.error)} />
      <TextField label="Name" hint="What the token is for, e.g. “Nightly occurrence export”." name="name" value={name} error={errors.name} onChange={(e) => setName(e.target.value)} />
      <fieldset>
        <legend className="text-sm font-medium text-stone-900">Studies and the role the token acts with</legend>
        <p className="mt-1 text-sm text-stone-600">At most your own role in each study; a role with fewer rights is safer for a script.</p>
        <ul className="mt-3 divide-y divide-stone-100 rounded-lg border border-stone-200">
          {list.map((study) => {
            const allowed = STUDY_ROLES.filter((r) => roleCovers(study.role, r));
            const role = chosen[study.id];
            return (
              <li key={study.id} className="flex flex-wrap items-center justify-between gap-3 px-3 py-2">
                <label className="flex min-w-0 items-center gap-2 text-sm text-stone-800">
                  <input
                    type="checkbox"
                    checked={role !== undefined}
                    onChange={(e) => setChosen((c) => ({ ...c, [study.id]: e.target.checked ? (allowed.includes("viewer") ? "viewer" : allowed[0]) : undefined }))}
                  />
                  <span className="truncate">{study.name}</span>
                  <span className="text-xs text-stone-500">(you: {ROLE_LABELS[study.role]})</span>
                </label>
                {role !== undefined && (
                  <select
                    aria-label={`Role of the token in ${study.name}`}
                    value={role}
                    onChange={(e) => setChosen((c) => ({ ...c, [study.id]: e.target.value as StudyRole }))}
                    className="rounded-md border border-stone-300 bg-white px-2 py-1 text-sm"
                  >
                    {allowed.map((r) => (
                      <option key={r} value={r}>
                        {ROLE_LABELS[r]}
                      </option>
                    ))}
                  </select>
                )}
              </li>
            );
          })}
        </ul>
        {studiesError && (
          <p role="alert" className="mt-2 text-sm text-red-700">
            {studiesError}
          </p>
        )}
      </fieldset>
      <TextField
        label="Expires after (days)"
        type="number"
        min={1}
        max={API_TOKEN_MAX_DAYS}
        hint={`From 1 to ${API_TOKEN_MAX_DAYS} days.`}
        name="expiresInDays"
        value={days}
        error={errors.expiresInDays}
        onChange={(e) => setDays(e.target.value)}
      />
      <div className="flex justify-end">
        <Button type="submit" busy={create.isPending}>
          Make token
        </Button>
      </div>
    </form>
  );
}

function TokenList({ tokens }: { tokens: ApiToken[] }) {
  const revoke = useRevokeApiToken();
  const [asked, setAsked] = useState<ApiToken | null>(null);
  return (
    <>
      <ul className="divide-y divide-stone-100">
        {tokens.map((token) => (
          <li key={token.id} className="flex flex-wrap items-start justify-between gap-3 py-3">
            <div className="min-w-0 text-sm">
              <p className="font-medium text-stone-900">
                {token.name} <code className="ml-1 font-mono text-xs text-stone-500">{token.prefix}…</code>
                <span className={token.status === "active" ? "ml-2 text-xs text-accent-700" : "ml-2 text-xs text-stone-500"}>{STATUS_WORDS[token.status]}</span>
              </p>
              <p className="text-stone-600">{token.studies.map((s) => `${s.studyName} (${ROLE_LABELS[s.role]})`).join(" · ")}</p>
              <p className="text-xs text-stone-500">
                Made {formatDate(token.createdAt)} · {token.status === "revoked" ? `revoked ${formatDate(token.revokedAt!)}` : `expires ${formatDate(token.expiresAt)}`} ·{" "}
                {token.lastUsedAt ? `last used ${formatDateTime(token.lastUsedAt)}` : "never used"}
              </p>
            </div>
            {token.status === "active" && (
              <Button size="sm" variant="secondary" onClick={() => setAsked(token)} aria-label={`Revoke the token “${token.name}”`}>
                Revoke
              </Button>
            )}
          </li>
        ))}
      </ul>
      <ConfirmDialog
        open={asked !== null}
        title={`Revoke “${asked?.name ?? ""}”?`}
        confirmLabel="Revoke token"
        tone="danger"
        busy={revoke.isPending}
        error={formLevelMessage(revoke.error)}
        onCancel={() => setAsked(null)}
        onConfirm={() => asked && revoke.mutate(asked.id, { onSuccess: () => setAsked(null) })}
      >
        Scripts using it stop working with their next request. This cannot be undone; make a new token if you need one again.
      </ConfirmDialog>
    </>
  );
}
