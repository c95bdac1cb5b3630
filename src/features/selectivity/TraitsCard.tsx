import { useId } from "react";
import { RUN_MAX_TRAITS } from "@shared/schemas/runs";
import type { Trait } from "@shared/schemas/traits";
import type { NumericTransform } from "@shared/codebook";
import { Button, ButtonLink } from "../../components/Button";
import { Card } from "../../components/Card";
import { cx } from "../../lib/cx";
import { Select } from "../../components/Select";
import type { FieldErrors } from "../../lib/forms";
import { paths } from "../../lib/paths";
import type { DraftTrait } from "./configDraft";
import { KIND_LABEL } from "./words";

export interface TraitsCardProps {
  studyId: string;
  /** The codebook's traits in force (retired ones left out). */
  traits: readonly Trait[];
  chosen: readonly DraftTrait[];
  errors: FieldErrors;
  onToggle: (traitId: string, on: boolean) => void;
  onChange: (trait: DraftTrait) => void;
  onChooseAll: (on: boolean) => void;
}

const TRANSFORM_WORDS: Record<NumericTransform, string> = { none: "as given", log10: "log10" };

/** The traits a run tests, each with its reference state, or its scale for numbers. */
export function TraitsCard({ studyId, traits, chosen, errors, onToggle, onChange, onChooseAll }: TraitsCardProps) {
  const byId = new Map(chosen.map((t, i) => [t.traitId, { draft: t, index: i }]));
  const tooMany = chosen.length > RUN_MAX_TRAITS;
  return (
    <Card
      title="2. Traits to test"
      description="Each chosen trait is tested on its own and enters the multiple regression with the others. Odds ratios compare each state with a reference state."
      actions={
        traits.length > 1 && (
          <>
            <Button variant="ghost" size="sm" onClick={() => onChooseAll(true)} disabled={chosen.length === traits.length}>
              Choose all
            </Button>
            <Button variant="ghost" size="sm" onClick={() => onChooseAll(false)} disabled={chosen.length === 0}>
              Clear
            </Button>
          </>
        )
      }
    >
      {traits.length === 0 ? (
        <div className="rounded-lg border border-dashed border-stone-300 px-4 py-6 text-center">
          <p className="text-[15px] text-stone-600">The codebook has no traits in force. Define traits, and code them in the trait table, before testing selectivity.</p>
          <ButtonLink to={`${paths.study(studyId)}/codebook`} variant="secondary" size="sm" className="mt-4">
            Open the codebook
          </ButtonLink>
        </div>
      ) : (
        <ul className="divide-y divide-stone-100" aria-label="Traits of the codebook">
          {traits.map((trait) => {
            const entry = byId.get(trait.id);
            return (
              <TraitRow
                key={trait.id}
                trait={trait}
                draft={entry?.draft}
                errors={entry ? pick(errors, `traits.${entry.index}`) : []}
                onToggle={(on) => onToggle(trait.id, on)}
                onChange={onChange}
              />
            );
          })}
        </ul>
      )}
      {(errors.traits || tooMany) && (
        <p className="mt-2 text-sm font-medium text-red-700">{errors.traits ?? `Choose at most ${RUN_MAX_TRAITS} traits.`}</p>
      )}
    </Card>
  );
}

function pick(errors: FieldErrors, prefix: string): Array<[string, string]> {
  return Object.entries(errors).filter(([key]) => key === prefix || key.startsWith(`${prefix}.`));
}

function TraitRow({
  trait,
  draft,
  errors,
  onToggle,
  onChange,
}: {
  trait: Trait;
  draft: DraftTrait | undefined;
  errors: Array<[string, string]>;
  onToggle: (on: boolean) => void;
  onChange: (trait: DraftTrait) => void;
}) {
  const checkId = useId();
  const standardiseId = useId();
  const on = draft !== undefined;
  const numeric = trait.kind === "numeric";
  const error = (field: string) => errors.find(([key]) => key.endsWith(`.${field}`))?.[1];
  const other = errors.filter(([key]) => !/\.(reference|transform|standardise)$/.test(key)).map(([, message]) => message);

  return (
    <li className="py-3" data-trait-option={trait.key}>
      <div className="flex items-start gap-3">
        <input
          id={checkId}
          type="checkbox"
          checked={on}
          onChange={(event) => onToggle(event.target.checked)}
          className="mt-1 size-4 shrink-0 rounded border-stone-300 accent-accent-600"
        />
        <label htmlFor={checkId} className="min-w-0 flex-1 cursor-pointer">
          <span className="font-medium text-stone-900">{trait.label}</span>
          <span className="ml-2 text-sm text-stone-500">
            {KIND_LABEL[trait.kind]}
            {numeric ? (trait.unit ? `, ${trait.unit}` : "") : `, ${trait.states.length} states`}
          </span>
        </label>
      </div>
      {on && (
        <div className={cx("mt-3 ml-7 grid gap-4", numeric ? "sm:grid-cols-2" : "sm:max-w-sm")}>
          {numeric ? (
            <>
              <Select
                label={`Scale of ${trait.label}`}
                value={draft.transform ?? ""}
                error={error("transform")}
                onChange={(event) => onChange({ ...draft, transform: (event.target.value || undefined) as NumericTransform | undefined })}
                options={[
                  { value: "", label: `As the codebook reads it (${TRANSFORM_WORDS[trait.transform]})` },
                  { value: "none", label: "As given" },
                  { value: "log10", label: "log10 (values must be above 0)" },
                ]}
              />
              <div className="flex items-start gap-2 sm:pt-7">
                <input
                  id={standardiseId}
                  type="checkbox"
                  checked={draft.standardise ?? false}
                  onChange={(event) => onChange({ ...draft, standardise: event.target.checked })}
                  className="mt-1 size-4 shrink-0 rounded border-stone-300 accent-accent-600"
                />
                <label htmlFor={standardiseId} className="text-sm text-stone-700">
                  Standardise: odds ratio per standard deviation instead of per unit
                  {error("standardise") && <span className="block font-medium text-red-700">{error("standardise")}</span>}
                </label>
              </div>
            </>
          ) : (
            <Select
              label={`Reference state of ${trait.label}`}
              value={draft.reference ?? ""}
              error={error("reference")}
              onChange={(event) => onChange({ ...draft, reference: event.target.value || undefined })}
              options={[{ value: "", label: "The most common state (default)" }, ...trait.states.map((s) => ({ value: s.code, label: `${s.label} (${s.code})` }))]}
            />
          )}
        </div>
      )}
      {other.map((message) => (
        <p key={message} className="mt-1 ml-7 text-sm font-medium text-red-700">
          {message}
        </p>
      ))}
    </li>
  );
}
