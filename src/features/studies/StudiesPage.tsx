import { useEffect, type ReactNode } from "react";
import { Link, NavigationType, useNavigate, useNavigationType } from "react-router-dom";
import { SUGGESTED_CODEBOOK } from "@shared/codebook";
import type { Study } from "@shared/schemas/studies";
import { Button, ButtonLink } from "../../components/Button";
import { ErrorState } from "../../components/ErrorState";
import { focusRing } from "../../components/focus";
import { cx } from "../../lib/cx";
import { LoadingState } from "../../components/LoadingState";
import { PageHeader } from "../../components/PageHeader";
import { RoleBadge } from "../../components/RoleBadge";
import { textLinkClasses } from "../../components/TextLink";
import { formatDate, pluralize } from "../../lib/format";
import { paths } from "../../lib/paths";
import { markListSeen, onlyStudyToOpen } from "../../lib/onlyStudy";
import { useMe } from "../../lib/session";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useStudies } from "./api";
import { newStudyThen } from "./newStudySteps";
import { downloadSuggestedTaxaTemplate, TAXA_TEMPLATE_FILE_NAME } from "./taxaTemplate";

/**
 * A person with exactly one study (a demo account on first start, someone just invited) goes straight
 * to it when the studies list is where they arrive (after signing in, or opening the address) for
 * the first time in this browser session. A link to the list (All studies) always shows the list.
 */
function useOpenOnlyStudyOnce(studies: Study[] | undefined): boolean {
  const me = useMe();
  const navigate = useNavigate();
  const arrivedByLink = useNavigationType() === NavigationType.Push;
  const userId = me.data?.user.id;
  const only = userId && !arrivedByLink ? onlyStudyToOpen(userId, studies) : null;
  useEffect(() => {
    if (!userId || !studies) return;
    markListSeen(userId);
    if (only) navigate(paths.study(only.id), { replace: true });
  }, [only, studies, userId, navigate]);
  return only !== null;
}

/** Home: the studies the person leads or belongs to. */
export function StudiesPage() {
  useDocumentTitle("Studies");
  const studies = useStudies();
  const hasStudies = (studies.data?.length ?? 0) > 0;
  const opening = useOpenOnlyStudyOnce(studies.data);
  if (opening) return <LoadingState label="Opening your study" lines={0} />;

  return (
    <>
      <PageHeader
        title="Studies"
        description="Each study is one team’s question: a clade or region, its trait table, and the boundaries it crosses."
        actions={
          hasStudies && (
            <ButtonLink to={paths.newStudy} icon={<PlusIcon />}>
              New study
            </ButtonLink>
          )
        }
      />
      {studies.isPending && <LoadingState label="Loading your studies" />}
      {studies.isError && <ErrorState error={studies.error} title="Your studies could not be loaded" onRetry={() => void studies.refetch()} />}
      {studies.isSuccess && !hasStudies && <NoStudiesYet />}
      {studies.isSuccess && hasStudies && (
        <ul className="grid gap-4 sm:grid-cols-2 xl:grid-cols-3">
          {studies.data.map((study) => (
            <li key={study.id}>
              <StudyCard study={study} />
            </li>
          ))}
        </ul>
      )}
    </>
  );
}

function StudyCard({ study }: { study: Study }) {
  return (
    <Link
      to={paths.study(study.id)}
      className={cx(
        "group flex h-full flex-col rounded-xl border border-stone-200 bg-white p-5 shadow-[0_1px_2px_rgb(28_25_23/0.04)] transition hover:border-accent-200 hover:shadow-md",
        focusRing,
      )}
    >
      <div className="flex items-start justify-between gap-3">
        <h2 className="text-base font-semibold tracking-tight text-stone-900 group-hover:text-accent-800">{study.name}</h2>
        <RoleBadge role={study.role} className="shrink-0" />
      </div>
      <p className={cx("mt-2 line-clamp-3 flex-1 text-[15px]", study.description ? "text-stone-600" : "text-stone-500 italic")}>
        {study.description || "No description yet."}
      </p>
      <p className="mt-4 flex flex-wrap gap-x-4 gap-y-1 text-sm text-stone-500 tabular-nums">
        <span>{pluralize(study.memberCount, "member")}</span>
        <span>Updated {formatDate(study.updatedAt)}</span>
      </p>
    </Link>
  );
}

function NoStudiesYet() {
  const traitNames = SUGGESTED_CODEBOOK.map((t) => t.label.toLowerCase()).join(", ");
  return (
    <section aria-labelledby="no-studies-title" className="rounded-xl border border-dashed border-stone-300 bg-white/60 px-6 py-10">
      <div className="flex flex-col items-center text-center">
        <div className="mb-5 text-accent-600">
          <SieveDrawing />
        </div>
        <h2 id="no-studies-title" className="text-lg font-semibold tracking-tight text-stone-900">
          No studies yet
        </h2>
        <div className="mt-2 max-w-xl text-[15px] text-stone-600">
          <p>Start a study for your question: which traits set the victims of a crisis apart from the survivors. Three steps get it going.</p>
          <p className="mt-2">Joining a colleague’s study? Open the invitation link from your e-mail.</p>
        </div>
      </div>
      <ol className="mx-auto mt-8 grid max-w-5xl gap-4 md:grid-cols-3">
        <FirstStep
          number={1}
          title="Define the codebook"
          action={
            <ButtonLink to={paths.newStudy} icon={<PlusIcon />}>
              Create your first study
            </ButtonLink>
          }
        >
          Add the traits your question needs, or start the new study from five suggested ones ({traitNames}), each with a coding rule, and change or retire them later.
        </FirstStep>
        <FirstStep
          number={2}
          title="Import taxa"
          action={
            <>
              <Button variant="secondary" onClick={downloadSuggestedTaxaTemplate} icon={<DownloadIcon />}>
                Download the CSV template
              </Button>
              <Link to={newStudyThen("imports")} className={cx(textLinkClasses, "text-sm")}>
                Create a study and import
              </Link>
            </>
          }
        >
          One row per taxon: name, higher taxon, first and last appearance (ages in Ma or stage names) and a column per trait. The template ({TAXA_TEMPLATE_FILE_NAME}) has the
          columns the import recognises.
        </FirstStep>
        <FirstStep
          number={3}
          title="Pick a boundary"
          action={
            <ButtonLink to={newStudyThen("boundary")} variant="secondary">
              Create a study and pick a boundary
            </ButtonLink>
          }
        >
          Choose a boundary of the geologic time scale and a window below it: every taxon becomes a survivor, a victim or not at risk, ready for the selectivity tests.
        </FirstStep>
      </ol>
    </section>
  );
}

function FirstStep({ number, title, action, children }: { number: number; title: string; action: ReactNode; children: ReactNode }) {
  return (
    <li className="flex flex-col rounded-xl border border-stone-200 bg-white p-5 text-left shadow-[0_1px_2px_rgb(28_25_23/0.04)]">
      <div className="flex items-center gap-3">
        <span aria-hidden="true" className="flex size-7 shrink-0 items-center justify-center rounded-full bg-accent-100 text-sm font-semibold text-accent-900 tabular-nums">
          {number}
        </span>
        <h3 className="text-base font-semibold tracking-tight text-stone-900">
          <span className="sr-only">Step {number}: </span>
          {title}
        </h3>
      </div>
      <p className="mt-3 flex-1 text-[15px] text-stone-600">{children}</p>
      <div className="mt-5 flex flex-wrap items-center gap-x-4 gap-y-3">{action}</div>
    </li>
  );
}

function DownloadIcon() {
  return (
    <svg className="size-4" viewBox="0 0 20 20" fill="currentColor" aria-hidden="true">
      <path d="M10.75 2.75a.75.75 0 0 0-1.5 0v8.69L6.53 8.72a.75.75 0 0 0-1.06 1.06l4 4a.75.75 0 0 0 1.06 0l4-4a.75.75 0 1 0-1.06-1.06l-2.72 2.72V2.75Z" />
      <path d="M3.5 12.75a.75.75 0 0 0-1.5 0v2.5A2.75 2.75 0 0 0 4.75 18h10.5A2.75 2.75 0 0 0 18 15.25v-2.5a.75.75 0 0 0-1.5 0v2.5c0 .69-.56 1.25-1.25 1.25H4.75c-.69 0-1.25-.56-1.25-1.25v-2.5Z" />
    </svg>
  );
}

function PlusIcon() {
  return (
    <svg className="size-4" viewBox="0 0 20 20" fill="currentColor" aria-hidden="true">
      <path d="M10.75 4.75a.75.75 0 0 0-1.5 0v4.5h-4.5a.75.75 0 0 0 0 1.5h4.5v4.5a.75.75 0 0 0 1.5 0v-4.5h4.5a.75.75 0 0 0 0-1.5h-4.5v-4.5Z" />
    </svg>
  );
}

/** Strata above a sieve: some grains pass, some stay. */
function SieveDrawing() {
  return (
    <svg width="120" height="84" viewBox="0 0 120 84" fill="none" aria-hidden="true">
      <rect x="8" y="6" width="104" height="9" rx="4.5" fill="currentColor" opacity="0.16" />
      <rect x="8" y="20" width="64" height="9" rx="4.5" fill="currentColor" opacity="0.28" />
      <rect x="78" y="20" width="34" height="9" rx="4.5" fill="currentColor" opacity="0.16" />
      <path d="M14 40h92l-10 22H24L14 40Z" stroke="currentColor" strokeWidth="2.5" strokeLinejoin="round" />
      <path d="M30 48h60M36 55h48" stroke="currentColor" strokeWidth="1.5" strokeDasharray="3 4" opacity="0.6" />
      <circle cx="46" cy="72" r="3" fill="currentColor" opacity="0.55" />
      <circle cx="60" cy="78" r="3" fill="currentColor" opacity="0.35" />
      <circle cx="72" cy="71" r="3" fill="currentColor" opacity="0.55" />
    </svg>
  );
}
