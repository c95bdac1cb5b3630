import type { ThreadTarget } from "@shared/schemas/threads";
import { TextLink } from "../../components/TextLink";
import { paths } from "../../lib/paths";

/** Where a thread's target lives, for the screens that exist. */
export function targetScreen(studyId: string, target: ThreadTarget): { to: string; label: string } | null {
  switch (target.type) {
    case "value":
    case "taxon":
      return { to: `${paths.study(studyId)}/table`, label: "Open the trait table" };
    case "trait":
      return { to: `${paths.study(studyId)}/codebook`, label: "Open the codebook" };
    case "override":
      return { to: `${paths.study(studyId)}/boundary`, label: "Open the boundary screen" };
    case "run":
      return target.missing ? null : { to: `${paths.study(studyId)}/selectivity?run=${encodeURIComponent(target.id)}`, label: "Open the run" };
    case "comparison":
      return target.missing ? null : { to: `${paths.study(studyId)}/modern-comparison/comparisons/${encodeURIComponent(target.id)}`, label: "Open the comparison" };
    default:
      return null;
  }
}

export function TargetLink({ studyId, target }: { studyId: string; target: ThreadTarget }) {
  const screen = targetScreen(studyId, target);
  return screen ? <TextLink to={screen.to}>{screen.label}</TextLink> : null;
}
