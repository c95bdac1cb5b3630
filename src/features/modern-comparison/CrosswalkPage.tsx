import { useMemo, useState } from "react";
import { useParams } from "react-router-dom";
import { crosswalkCoverage, crosswalkProblems, statesWithSameName, type Crosswalk, type CrosswalkTrait } from "@shared/comparison";
import { can } from "@shared/roles";
import { crosswalkSchema, type ModernList } from "@shared/schemas/modernLists";
import type { Trait } from "@shared/schemas/traits";
import { Button, ButtonLink } from "../../components/Button";
import { Card } from "../../components/Card";
import { controlClasses } from "../../components/Field";
import { Select } from "../../components/Select";
import { cx } from "../../lib/cx";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { FormError, Notice } from "../../components/Notice";
import { PageHeader } from "../../components/PageHeader";
import { useToast } from "../../components/Toast";
import { ApiError, errorMessage } from "../../lib/api";
import { useCurrentStudy } from "../../lib/currentStudy";
import { formatCount, pluralize } from "../../lib/format";
import { paths } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useTraits } from "../../lib/queries/codebook";
import { useModernList, useSaveCrosswalk } from "./api";

/** One trait's pairing as the form holds it: "" column = not paired; a value absent from `states` = not decided yet. */
interface DraftPair {
  column: string;
  states: Record<string, string | null>;
  multiplier: string;
}
type Draft = Record<string, DraftPair>;

const toCrosswalkTraits = (traits: Trait[]): CrosswalkTrait[] =>
  traits.map((t) => ({ id: t.id, key: t.key, label: t.label, kind: t.kind, states: t.states.map((s) => ({ code: s.code, label: s.label })), unit: t.unit, retired: t.retired }));

function draftFrom(crosswalk: Crosswalk, traits: Trait[]): Draft {
  const draft: Draft = {};
  for (const t of traits) draft[t.id] = { column: "", states: {}, multiplier: "1" };
  for (const p of crosswalk.pairs) if (draft[p.traitId]) draft[p.traitId] = { column: p.column, states: { ...p.states }, multiplier: String(p.multiplier) };
  return draft;
}

function crosswalkFrom(draft: Draft, traits: Trait[]): Crosswalk {
  return {
    pairs: traits
      .filter((t) => draft[t.id]?.column)
      .map((t) => {
        const d = draft[t.id];
        return { traitId: t.id, column: d.column, states: t.kind === "numeric" ? {} : d.states, multiplier: t.kind === "numeric" ? Number(d.multiplier.trim().replace(",", ".")) : 1 };
      }),
  };
}

/** Why a value cannot be read, in a few words for the list at the top. */
function unusableWhy(kind: Trait["kind"], states: Record<string, string | null>, value: string): string {
  if (kind === "numeric") return "not a number";
  return value in states && states[value] === null ? "marked as matching no state" : "no state chosen";
}

const NOT_DECIDED = "__undecided";
const NO_STATE = "__none";

/** The crosswalk screen: pair the list's columns with the study's traits, and its values with the traits' states. */
export function CrosswalkPage() {
  const study = useCurrentStudy();
  const { listId = "" } = useParams();
  const list = useModernList(study.id, listId);
  const traits = useTraits(study.id);
  useDocumentTitle(list.data ? `Crosswalk · ${list.data.name}` : "Crosswalk");
  const back = `${paths.study(study.id)}/modern-comparison`;

  return (
    <>
      <PageHeader
        eyebrow={study.name}
        title={list.data ? `Crosswalk: ${list.data.name}` : "Crosswalk"}
        description="Say which column of the list holds which trait of the codebook, and which of the list's own words means which state. Values left without a state are listed here and keep their species out of the scores; nothing is dropped without being shown."
        actions={
          <ButtonLink to={back} variant="secondary">
            Back to modern comparison
          </ButtonLink>
        }
      />
      {(list.isPending || traits.isPending) && <LoadingState label="Loading the list and the codebook" lines={6} />}
      {list.isError && <ErrorState error={list.error} title="The list could not be loaded" onRetry={() => void list.refetch()} />}
      {traits.isError && <ErrorState error={traits.error} title="The codebook could not be loaded" onRetry={() => void traits.refetch()} />}
      {list.data && traits.data && (
        <CrosswalkEditor key={list.data.updatedAt} studyId={study.id} list={list.data} traits={traits.data.traits} canEdit={can(study.role, "comparisons.create")} />
      )}
    </>
  );
}

function CrosswalkEditor({ studyId, list, traits, canEdit }: { studyId: string; list: ModernList; traits: Trait[]; canEdit: boolean }) {
  const active = useMemo(() => traits.filter((t) => !t.retired), [traits]);
  const cwTraits = useMemo(() => toCrosswalkTraits(traits), [traits]);
  // Before a first save, columns and values with the same name as a trait or state are paired for review.
  const [draft, setDraft] = useState<Draft>(() => {
    const start = draftFrom(list.crosswalk ?? list.suggestedCrosswalk, active);
    if (list.crosswalk) return start;
    for (const trait of cwTraits) {
      const d = start[trait.id];
      const column = d?.column ? list.columns.find((c) => c.name === d.column) : undefined;
      if (column) d.states = statesWithSameName(trait, column.values.map((v) => v.value), d.states);
    }
    return start;
  });
  // What was paired by name, not by a person: marked on screen until changed or saved.
  const [byName, setByName] = useState<Record<string, { column: boolean; values: Set<string> }>>(() =>
    list.crosswalk ? {} : Object.fromEntries(Object.entries(draft).filter(([, d]) => d.column).map(([id, d]) => [id, { column: true, values: new Set(Object.keys(d.states).filter((v) => d.states[v] !== null)) }])),
  );
  const [dirty, setDirty] = useState(list.crosswalk === null);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const save = useSaveCrosswalk(studyId, list.id);
  const toast = useToast();
  const columns = list.columns;
  const crosswalk = crosswalkFrom(draft, active);
  const pairedByName = Object.values(byName).some((b) => b.column || b.values.size > 0);
  const coverage = crosswalkCoverage(columns, crosswalk, cwTraits, { decimalComma: list.decimalComma });
  const unusable = coverage.pairs.filter((p) => p.unusable.length > 0);
  const retiredInSaved = (list.crosswalk?.pairs ?? []).filter((p) => traits.find((t) => t.id === p.traitId)?.retired);
  const usedColumns = new Set(Object.values(draft).map((d) => d.column).filter(Boolean));

  function update(traitId: string, change: (d: DraftPair) => DraftPair) {
    setDraft((current) => ({ ...current, [traitId]: change(current[traitId]) }));
    setDirty(true);
    setErrors({});
  }

  /** A column chosen by hand: its values with a state's name are matched at once (marked for review). */
  function pairColumn(trait: Trait, columnName: string) {
    const column = columns.find((c) => c.name === columnName);
    const cwTrait = cwTraits.find((t) => t.id === trait.id)!;
    const states = column ? statesWithSameName(cwTrait, column.values.map((v) => v.value)) : {};
    update(trait.id, (p) => ({ ...p, column: columnName, states }));
    setByName((current) => ({ ...current, [trait.id]: { column: false, values: new Set(Object.keys(states)) } }));
  }

  /** A value's state chosen by hand is no longer "matched by name". */
  function decidedByHand(traitId: string, value: string) {
    setByName((current) => {
      const entry = current[traitId];
      if (!entry?.values.has(value)) return current;
      const values = new Set(entry.values);
      values.delete(value);
      return { ...current, [traitId]: { ...entry, values } };
    });
  }

  function submit() {
    const parsed = crosswalkSchema.safeParse(crosswalk);
    const problems = parsed.success ? crosswalkProblems(parsed.data, cwTraits, columns.map((c) => c.name)) : Object.fromEntries(parsed.error.issues.map((i) => [i.path.join("."), i.message]));
    if (!parsed.success || Object.keys(problems).length) return setErrors(problems);
    save.mutate(parsed.data, {
      onSuccess: (saved) => {
        setDirty(false);
        setByName({});
        const left = saved.coverage.pairs.reduce((n, p) => n + p.unusableSpecies, 0);
        toast.show(left ? `Crosswalk saved; ${pluralize(left, "species")} hold a value with no state` : "Crosswalk saved", left ? "info" : "success");
      },
      onError: (error) => {
        if (error instanceof ApiError) setErrors(error.fields);
      },
    });
  }

  const errorFor = (index: number, field: string) => errors[`pairs.${index}.${field}`];
  const pairIndex = (traitId: string) => crosswalk.pairs.findIndex((p) => p.traitId === traitId);

  return (
    <div className="space-y-6">
      <section aria-labelledby="unmapped-heading" className={cx("rounded-xl border px-5 py-4", unusable.length ? "border-caution-200 bg-caution-50" : "border-accent-200 bg-accent-50")}>
        <h2 id="unmapped-heading" className={cx("font-semibold", unusable.length ? "text-caution-700" : "text-accent-900")}>
          {unusable.length ? "Values without a state" : "Every value of the paired columns is read"}
        </h2>
        {unusable.length === 0 ? (
          <p className="mt-1 text-[15px] text-stone-700">No species is left unscored by a value the crosswalk cannot read.</p>
        ) : (
          <>
            <p className="mt-1 text-[15px] text-stone-700">
              Species holding these values get no score in a comparison (they are counted and named there). Choose a state for a value, or mark it as matching none.
            </p>
            <ul className="mt-3 space-y-1 text-[15px]" aria-label="Values without a state">
              {unusable.flatMap((p) =>
                p.unusable.map((u) => (
                  <li key={`${p.traitId}:${u.value}`} className="flex flex-wrap gap-x-2">
                    <span className="font-medium text-stone-900">
                      {p.traitLabel} ← “{u.value}”
                    </span>
                    <span className="text-stone-600">
                      {pluralize(u.count, "species", "species")} in the column {p.column} · {unusableWhy(p.kind, draft[p.traitId]?.states ?? {}, u.value)}
                    </span>
                  </li>
                )),
              )}
            </ul>
          </>
        )}
        {(coverage.unpairedColumns.length > 0 || coverage.unpairedTraits.length > 0) && (
          <p className="mt-3 text-sm text-stone-600">
            {coverage.unpairedColumns.length > 0 && <>List columns paired with no trait: {coverage.unpairedColumns.join(", ")}. </>}
            {coverage.unpairedTraits.length > 0 && <>Traits with no column: {coverage.unpairedTraits.map((t) => t.label).join(", ")}; a run whose model uses one of them cannot score this list.</>}
          </p>
        )}
      </section>

      {pairedByName && (
        <Notice title="Paired by name, for your review">
          Columns named like a trait, and values named like one of its states (case and spaces aside), are paired for you and marked “same name” below.
          Check each one, change what does not fit, then save the crosswalk: nothing is used before it is saved.
        </Notice>
      )}
      {retiredInSaved.length > 0 && <Notice>The saved crosswalk pairs retired traits; they are left out here and when saved.</Notice>}
      {!canEdit && <Notice>Your role can read this crosswalk; a study lead or an analyst can change it.</Notice>}

      {active.map((trait) => {
        const d = draft[trait.id];
        const column = columns.find((c) => c.name === d.column);
        const index = pairIndex(trait.id);
        const cover = coverage.pairs.find((p) => p.traitId === trait.id);
        const columnOptions = columns.filter((c) => c.name === d.column || !usedColumns.has(c.name));
        return (
          <Card
            key={trait.id}
            headingLevel={2}
            title={trait.label}
            description={
              trait.kind === "numeric"
                ? `Numeric${trait.unit ? `, in ${trait.unit}` : ""}${trait.transform === "log10" ? ", analysed on the log10 scale" : ""}`
                : `${trait.kind[0].toUpperCase()}${trait.kind.slice(1)}: ${trait.states.map((s) => s.label).join(", ")}`
            }
          >
            <div className="grid gap-4 sm:grid-cols-[minmax(0,16rem)_1fr] sm:items-start">
              <Select
                label={
                  <>
                    List column<span className="sr-only"> for {trait.label}</span>
                  </>
                }
                value={d.column}
                disabled={!canEdit}
                error={errorFor(index, "column")}
                hint={byName[trait.id]?.column && d.column ? <span className="font-medium text-accent-800">Same name: paired for review</span> : undefined}
                onChange={(e) => pairColumn(trait, e.target.value)}
                options={[{ value: "", label: "— Not paired —" }, ...columnOptions.map((c) => ({ value: c.name, label: c.name }))]}
              />
              {column && cover && (
                <p className="text-sm text-stone-600 sm:pt-7">
                  {pluralize(cover.usable, "species", "species")} read, {formatCount(cover.missing)} without a value
                  {cover.unusableSpecies > 0 && <span className="font-medium text-caution-700">, {pluralize(cover.unusableSpecies, "species", "species")} with a value that cannot be read</span>}.
                </p>
              )}
            </div>

            {column && trait.kind === "numeric" && (
              <div className="mt-4 max-w-xs">
                <label className="flex flex-col gap-1.5 text-sm font-medium text-stone-800">
                  Multiplier to {trait.unit ?? "the trait's unit"}
                  <input
                    aria-label={`Multiplier for ${trait.label}`}
                    inputMode="decimal"
                    className={cx(controlClasses(Boolean(errorFor(index, "multiplier"))), "h-10")}
                    value={d.multiplier}
                    disabled={!canEdit}
                    onChange={(e) => update(trait.id, (p) => ({ ...p, multiplier: e.target.value }))}
                  />
                  <span className="font-normal text-stone-500">List value × multiplier = value in {trait.unit ?? "the trait's unit"}; e.g. 10 for centimetres to millimetres.</span>
                  {errorFor(index, "multiplier") && <span className="font-medium text-red-700">{errorFor(index, "multiplier")}</span>}
                </label>
              </div>
            )}

            {column && trait.kind !== "numeric" && (
              <div className="mt-4 overflow-x-auto">
                <table className="min-w-full text-sm">
                  <caption className="sr-only">
                    Values of {column.name} and the states of {trait.label} they mean
                  </caption>
                  <thead className="text-left text-stone-500">
                    <tr>
                      <th scope="col" className="py-1.5 pr-4 font-medium">
                        Value in the list
                      </th>
                      <th scope="col" className="py-1.5 pr-4 text-right font-medium">
                        Species
                      </th>
                      <th scope="col" className="py-1.5 font-medium">
                        State of {trait.label}
                      </th>
                    </tr>
                  </thead>
                  <tbody className="divide-y divide-stone-100">
                    {column.values.map(({ value, count }) => {
                      const chosen = value in d.states ? (d.states[value] ?? NO_STATE) : NOT_DECIDED;
                      const fieldError = errorFor(index, `states.${value}`);
                      const sameName = byName[trait.id]?.values.has(value) ?? false;
                      return (
                        <tr key={value} className={chosen === NOT_DECIDED || chosen === NO_STATE ? "bg-caution-50/60" : undefined}>
                          <td className="py-1.5 pr-4 font-medium text-stone-900">{value}</td>
                          <td className="py-1.5 pr-4 text-right tabular-nums text-stone-600">{formatCount(count)}</td>
                          <td className="py-1.5">
                            <div className="flex flex-wrap items-center gap-2">
                              <Select
                                label={`State of ${trait.label} for “${value}”`}
                                hideLabel
                                className="w-full max-w-xs"
                                value={chosen}
                                disabled={!canEdit}
                                error={fieldError}
                                onChange={(e) => {
                                  decidedByHand(trait.id, value);
                                  update(trait.id, (p) => {
                                    const states = { ...p.states };
                                    if (e.target.value === NOT_DECIDED) delete states[value];
                                    else states[value] = e.target.value === NO_STATE ? null : e.target.value;
                                    return { ...p, states };
                                  });
                                }}
                                options={[
                                  { value: NOT_DECIDED, label: "— No state chosen —" },
                                  { value: NO_STATE, label: "Matches no state" },
                                  ...trait.states.map((s) => ({ value: s.code, label: `${s.label} (${s.code})` })),
                                ]}
                              />
                              {sameName && <span className="rounded-full bg-accent-50 px-2 py-0.5 text-xs font-semibold text-accent-800 ring-1 ring-accent-200">same name</span>}
                            </div>
                          </td>
                        </tr>
                      );
                    })}
                  </tbody>
                </table>
                {column.values.length === 0 && <p className="text-sm text-stone-500">This column holds no values.</p>}
              </div>
            )}
          </Card>
        );
      })}

      {canEdit && (
        <div className="sticky bottom-0 -mx-1 flex flex-wrap items-center justify-end gap-3 border-t border-stone-200 bg-stone-50/95 px-1 py-3 backdrop-blur">
          <FormError message={save.error && !(save.error instanceof ApiError && Object.keys(save.error.fields).length) ? errorMessage(save.error) : Object.keys(errors).length ? "Check the pairs marked above." : null} className="mr-auto" />
          <span className="text-sm text-stone-600" aria-live="polite">
            {dirty ? "Unsaved changes" : "Saved"}
          </span>
          <Button onClick={submit} busy={save.isPending}>
            Save the crosswalk
          </Button>
        </div>
      )}
    </div>
  );
}
