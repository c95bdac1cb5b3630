import type { ReactNode } from "react";
import { can } from "@shared/roles";
import type { Study } from "@shared/schemas/studies";
import { buttonClasses, ButtonLink } from "../../components/Button";
import { Card } from "../../components/Card";
import { pluralize } from "../../lib/format";
import { paths } from "../../lib/paths";
import { useTraits } from "../../lib/queries/codebook";
import { templateCsvUrl } from "../../lib/queries/paths";
import { useTaxaTotal } from "./api";

/**
 * The three steps from a new study to its first test, while the study has no taxa. Hidden once taxa
 * are in (and while the count is unknown: the rest of the overview does not depend on it).
 */
export function FirstSteps({ study }: { study: Study }) {
  const taxaTotal = useTaxaTotal(study.id);
  const codebook = useTraits(study.id);
  if (taxaTotal.data !== 0) return null;

  const activeTraits = codebook.data?.traits.filter((t) => !t.retired).length;
  const editsCodebook = can(study.role, "codebook.edit");
  const imports = can(study.role, "imports.run");
  const screen = (path: string) => `${paths.study(study.id)}/${path}`;

  return (
    <Card title="First steps" description="This study has no taxa yet. Three steps lead to the first selectivity test.">
      <ol className="space-y-5">
        <Step
          number={1}
          title="Define the codebook"
          status={activeTraits === undefined ? null : activeTraits === 0 ? "No traits yet" : `${pluralize(activeTraits, "trait")} in the codebook`}
          action={
            <ButtonLink to={screen("codebook")} variant={editsCodebook ? "primary" : "secondary"} size="sm">
              {editsCodebook ? "Edit the codebook" : "Read the codebook"}
            </ButtonLink>
          }
        >
          {editsCodebook
            ? activeTraits === 0
              ? "The codebook is empty: add the traits your question needs, each with its states and coding rule, before coding begins."
              : "Check the traits’ states and coding rules, and add the traits your question needs before coding begins."
            : "The traits, their states and the rule for coding each. A coder or the study lead edits them."}
        </Step>
        <Step
          number={2}
          title="Import taxa"
          status="No taxa yet"
          action={
            <>
              <ButtonLink to={screen("imports")} variant={imports ? "primary" : "secondary"} size="sm">
                {imports ? "Import taxa" : "See the imports"}
              </ButtonLink>
              <a href={templateCsvUrl(study.id)} download className={buttonClasses("ghost", "sm")}>
                Download the CSV template
              </a>
            </>
          }
        >
          {imports
            ? "Upload a CSV with one row per taxon: name, higher taxon, first and last appearance (ages in Ma or stage names) and one column per trait. The template has this study’s columns."
            : "A coder or the study lead uploads the trait table; the template shows the columns it takes."}
        </Step>
        <Step
          number={3}
          title="Pick a boundary"
          status={null}
          action={
            <ButtonLink to={screen("boundary")} variant="secondary" size="sm">
              Open the Boundary screen
            </ButtonLink>
          }
        >
          Once taxa are in, choose a boundary of the time scale and a window below it: each taxon becomes a survivor, a victim or not at risk, and the Selectivity screen tests the traits.
        </Step>
      </ol>
    </Card>
  );
}

function Step({ number, title, status, action, children }: { number: number; title: string; status: string | null; action: ReactNode; children: ReactNode }) {
  return (
    <li className="flex gap-4">
      <span aria-hidden="true" className="flex size-7 shrink-0 items-center justify-center rounded-full bg-accent-100 text-sm font-semibold text-accent-900 tabular-nums">
        {number}
      </span>
      <div className="min-w-0 flex-1">
        <div className="flex flex-wrap items-baseline gap-x-3 gap-y-1">
          <h3 className="text-[15px] font-semibold text-stone-900">
            <span className="sr-only">Step {number}: </span>
            {title}
          </h3>
          {status && <span className="text-sm text-stone-500 tabular-nums">{status}</span>}
        </div>
        <p className="mt-1 max-w-prose text-[15px] text-stone-600">{children}</p>
        <div className="mt-3 flex flex-wrap items-center gap-2">{action}</div>
      </div>
    </li>
  );
}
