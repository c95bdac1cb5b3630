import { Link, NavLink, Outlet, useMatch, useParams } from "react-router-dom";
import { can } from "@shared/roles";
import type { Study } from "@shared/schemas/studies";
import { buttonClasses } from "../components/Button";
import { ErrorState } from "../components/ErrorState";
import { focusRing } from "../components/focus";
import { cx } from "../lib/cx";
import { LoadingState } from "../components/LoadingState";
import { RoleBadge } from "../components/RoleBadge";
import { useStudy } from "../lib/queries/study";
import { ApiError } from "../lib/api";
import { CurrentStudyContext } from "../lib/currentStudy";
import { paths } from "../lib/paths";
import { PrefetchFromOverview } from "./PrefetchFromOverview";
import { STUDY_NAV } from "./studyNav";

/** Every page inside a study: loads the study once, shows the study navigation beside the page. */
export function StudyLayout() {
  const { studyId = "" } = useParams();
  const study = useStudy(studyId);
  const onOverview = useMatch("/studies/:studyId") !== null;

  if (study.isPending) return <LoadingState label="Loading the study" />;
  if (study.isError) {
    // A mistyped address answers 400 about the id; say it in words.
    const malformedAddress = study.error instanceof ApiError && study.error.status === 400 && "studyId" in study.error.fields;
    return (
      <ErrorState
        error={malformedAddress ? new Error("This address does not point to a study. Check the link, or open the study from your list.") : study.error}
        title="This study could not be opened"
        onRetry={malformedAddress ? undefined : () => void study.refetch()}
        actions={
          <Link to={paths.home} className={buttonClasses("ghost", "sm")}>
            Back to your studies
          </Link>
        }
      />
    );
  }

  return (
    <CurrentStudyContext value={study.data}>
      <div className="lg:grid lg:grid-cols-[13.5rem_minmax(0,1fr)] lg:gap-12">
        <StudyNav study={study.data} />
        <div className="min-w-0">
          <Outlet />
        </div>
        {onOverview && <PrefetchFromOverview study={study.data} />}
      </div>
    </CurrentStudyContext>
  );
}

const linkClasses = ({ isActive }: { isActive: boolean }) =>
  cx(
    "block shrink-0 rounded-md px-3 py-1.5 text-[15px] font-medium whitespace-nowrap transition-colors",
    isActive ? "bg-accent-50 text-accent-900 lg:shadow-[inset_2px_0_0_var(--color-accent-600,#176f63)]" : "text-stone-600 hover:bg-stone-100 hover:text-stone-900",
    focusRing,
  );

function StudyNav({ study }: { study: Study }) {
  const items = STUDY_NAV.filter((item) => !item.requires || can(study.role, item.requires));
  return (
    <div className="mb-8 lg:mb-0">
      <div className="mb-4 hidden lg:block">
        <Link to={paths.home} className={cx("rounded text-sm text-stone-500 hover:text-stone-800", focusRing)}>
          ← All studies
        </Link>
        <p className="mt-4 text-xs font-semibold tracking-wider text-stone-500 uppercase">Study</p>
        <p className="mt-1 font-semibold leading-snug text-stone-900 break-words">{study.name}</p>
        <RoleBadge role={study.role} className="mt-2" />
      </div>
      {/* On phones the same list becomes a row that scrolls sideways. */}
      <nav aria-label="Study" className="-mx-4 border-b border-stone-200 px-4 pb-2 lg:mx-0 lg:border-0 lg:px-0 lg:pb-0">
        <ul className="flex gap-1 overflow-x-auto lg:flex-col lg:overflow-visible">
          {items.map((item) => (
            <li key={item.path}>
              <NavLink to={item.path ? `${paths.study(study.id)}/${item.path}` : paths.study(study.id)} end={item.path === ""} className={linkClasses}>
                {item.label}
              </NavLink>
            </li>
          ))}
        </ul>
      </nav>
    </div>
  );
}
