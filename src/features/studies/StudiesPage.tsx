import { Link } from "react-router-dom";
import type { Study } from "@shared/schemas/studies";
import { ButtonLink } from "../../components/Button";
import { EmptyState } from "../../components/EmptyState";
import { ErrorState } from "../../components/ErrorState";
import { cx, focusRing } from "../../components/focus";
import { LoadingState } from "../../components/LoadingState";
import { PageHeader } from "../../components/PageHeader";
import { RoleBadge } from "../../components/RoleBadge";
import { formatDate, pluralize } from "../../lib/format";
import { paths } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useStudies } from "./api";

/** Home: the studies the person leads or belongs to. */
export function StudiesPage() {
  useDocumentTitle("Studies");
  const studies = useStudies();
  const hasStudies = (studies.data?.length ?? 0) > 0;

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
  return (
    <EmptyState
      illustration={<SieveDrawing />}
      title="No studies yet"
      description={
        <>
          <p>Start a study for your question: which traits set the victims of a crisis apart from the survivors.</p>
          <p className="mt-2">Joining a colleague’s study? Open the invitation link from your e-mail.</p>
        </>
      }
      action={
        <ButtonLink to={paths.newStudy} icon={<PlusIcon />}>
          Create your first study
        </ButtonLink>
      }
    />
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
