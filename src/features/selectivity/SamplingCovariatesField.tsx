// The set-up's choice of sampling covariates: how often each taxon was found, added to the multiple
// regression so the result can say whether a trait's odds ratio holds once sampling is allowed for.
import { useId } from "react";
import { SAMPLING_COVARIATES, SAMPLING_COVARIATE_LABELS, type SamplingCovariate } from "@shared/schemas/samplingCheck";
import type { Draft } from "./configDraft";

const HINTS: Record<SamplingCovariate, string> = {
  occurrences: "How many finds of the taxon the study's occurrences hold, on a log scale (an odds ratio per tenfold more finds).",
  collections: "How many distinct collections those finds come from.",
};

export function SamplingCovariatesField({ draft, error, onChange }: { draft: Draft; error?: string; onChange: (next: Partial<Draft>) => void }) {
  const legendId = useId();
  const baseId = useId();
  const toggle = (covariate: SamplingCovariate, on: boolean) =>
    onChange({ samplingCovariates: SAMPLING_COVARIATES.filter((c) => (c === covariate ? on : draft.samplingCovariates.includes(c))) });
  return (
    <fieldset className="mt-6 border-t border-stone-100 pt-5" aria-describedby={`${legendId}-hint`} data-testid="sampling-covariates">
      <legend id={legendId} className="text-[15px] font-medium text-stone-900">
        Allow for sampling
      </legend>
      <p id={`${legendId}-hint`} className="text-sm text-stone-500">
        A rarely found taxon is more likely to look extinct. Add how often each taxon was found to the multiple regression, and the results show each trait’s odds ratio
        with and without it, saying whether it holds. Taxa without any occurrence are left out of that comparison (their sampling is unknown); upload the finds on the
        Imports screen first.
      </p>
      <div className="mt-3 space-y-2">
        {SAMPLING_COVARIATES.map((covariate) => (
          <div key={covariate} className="flex items-start gap-3">
            <input
              id={`${baseId}-${covariate}`}
              type="checkbox"
              checked={draft.samplingCovariates.includes(covariate)}
              aria-describedby={`${baseId}-${covariate}-hint`}
              onChange={(event) => toggle(covariate, event.target.checked)}
              className="mt-1 size-4 shrink-0 rounded border-stone-300 accent-accent-600"
            />
            <div>
              <label htmlFor={`${baseId}-${covariate}`} className="text-[15px] text-stone-900">
                {SAMPLING_COVARIATE_LABELS[covariate]}
              </label>
              <p id={`${baseId}-${covariate}-hint`} className="text-sm text-stone-500">
                {HINTS[covariate]}
              </p>
            </div>
          </div>
        ))}
      </div>
      {error && <p className="mt-2 text-sm font-medium text-red-700">{error}</p>}
    </fieldset>
  );
}
