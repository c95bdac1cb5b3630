import { Link, useParams } from "react-router-dom";
import { ThreadView } from "../../components/threads/ThreadView";
import { useThread } from "../../components/threads/api";
import { focusRing } from "../../components/focus";
import { cx } from "../../lib/cx";
import { useCurrentStudy } from "../../lib/currentStudy";
import { paths } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { TargetLink } from "./targetLinks";

/** One thread on a page of its own: where e-mailed links and notifications lead. */
export function ThreadPage() {
  const study = useCurrentStudy();
  const { threadId = "" } = useParams();
  const thread = useThread(study.id, threadId);
  useDocumentTitle(`${thread.data?.title ?? "Thread"} · ${study.name}`);

  return (
    <div className="max-w-3xl">
      <Link to={paths.studyThreads(study.id)} className={cx("mb-4 inline-block rounded text-sm font-medium text-stone-600 hover:text-stone-900", focusRing)}>
        ← All threads
      </Link>
      <ThreadView studyId={study.id} threadId={threadId} headingLevel={1} targetAction={(target) => <TargetLink studyId={study.id} target={target} />} />
    </div>
  );
}
