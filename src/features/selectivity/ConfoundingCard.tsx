import { Card } from "../../components/Card";
import { cx } from "../../lib/cx";
import { pluralize } from "../../lib/format";
import { contrastWords, type ContrastData, type SelectivityResultData } from "./resultRows";
import { Body, ColHead, HeadRow, ResultTable, td, tdNum, thNum } from "./ResultTable";
import { formatChange, formatEstimate, formatInterval, formatP, formatWholePercent, levelWords } from "./words";
import { QUALIFIED_HIGHER_TAXON_RULE } from "@shared/imports/qualifiedHigherTaxon";

function OddsCell({ value, ci }: { value: number | undefined; ci: [number, number] | undefined }) {
  if (value === undefined || !ci) return <td className={cx(tdNum, "text-stone-500")}>—</td>;
  return (
    <td className={tdNum}>
      <span className="font-medium">{formatEstimate(value)}</span>
      <span className="block text-xs text-stone-500">{formatInterval(ci)}</span>
    </td>
  );
}

function moveWords(contrast: ContrastData): string {
  const parts = [
    contrast.changeOnCladeAdjustment !== null ? `clade ${formatChange(contrast.changeOnCladeAdjustment)}${checkP(contrast.cladeCheck)}` : null,
    contrast.changeOnModelAdjustment !== null ? `traits ${formatChange(contrast.changeOnModelAdjustment)}${checkP(contrast.modelCheck)}` : null,
  ].filter(Boolean);
  return parts.length ? parts.join(" · ") : "—";
}

/** " (p 0.003)": how far the move stands out from its own uncertainty. */
function checkP(check: ContrastData["cladeCheck"]): string {
  return check && check.pValue !== null ? ` (p ${formatP(check.pValue)})` : "";
}

/** The clade-adjusted odds ratio with how many clades carry it, and "thin" when they are too few. */
function CladeCell({ contrast }: { contrast: ContrastData }) {
  const adjusted = contrast.cladeAdjusted;
  if (!adjusted) return <OddsCell value={undefined} ci={undefined} />;
  const clades = adjusted.informativeClades;
  return (
    <td className={tdNum}>
      <span className="font-medium">{formatEstimate(adjusted.estimate)}</span>
      <span className="block text-xs text-stone-500">{formatInterval(adjusted.ci)}</span>
      {clades !== undefined && (
        <span className={cx("block text-xs", adjusted.thin ? "font-semibold text-caution-700" : "text-stone-500")} data-testid="informative-clades">
          {clades} {clades === 1 ? "clade" : "clades"}
          {adjusted.thin ? " · thin" : ""}
        </span>
      )}
    </td>
  );
}

/**
 * The contrasts' notes, each said once: a note shared by several contrasts (the regression being
 * Firth's, say) names them all in one item instead of repeating itself per contrast.
 */
export function groupNotes(contrasts: ReadonlyArray<{ name: string; notes: readonly string[] }>): string[] {
  const byNote = new Map<string, string[]>();
  for (const c of contrasts) for (const note of c.notes) byNote.set(note, [...(byNote.get(note) ?? []), c.name]);
  return [...byNote].map(([note, names]) => {
    if (names.length === 1) return `${names[0]}: ${note}`;
    if (names.length === contrasts.length) return `Every contrast: ${note}`;
    return `${names.length} contrasts, ${names.slice(0, -1).join(", ")} and ${names[names.length - 1]}: ${note}`;
  });
}

/**
 * The confounding check: each contrast's crude odds ratio beside the same odds ratio adjusted for
 * clade (Mantel-Haenszel, with Breslow-Day's test of one common odds ratio across clades) and for
 * the other traits (the multiple regression), flagged when it moves by more than the threshold.
 */
export function ConfoundingCard({
  result,
  level,
  threshold,
  explainedAbove = false,
}: {
  result: SelectivityResultData;
  level: number;
  threshold: number;
  /** The report has already said how the flag is decided (at its first boundary): say it once, point back here. */
  explainedAbove?: boolean;
}) {
  // Runs stored before the calibrated flag carry no method: they were flagged on the move alone.
  const calibrated = result.confoundingMethod !== undefined;
  const percent = levelWords(level);
  const rows = result.traits.flatMap((trait) => trait.contrasts.map((contrast) => ({ trait, contrast })));
  const flagged = rows.filter((r) => r.contrast.flagged);
  const notes = groupNotes(rows.map((r) => ({ name: `${r.trait.label} (${contrastWords(r.trait, r.contrast)})`, notes: r.contrast.notes })));

  return (
    <Card
      title="Confounding check"
      description={
        calibrated
          ? `Does each odds ratio hold once clade and the other traits are allowed for? A contrast is flagged when its crude odds ratio differs from the standardised one by more than ${formatWholePercent(threshold)} and by more than its own uncertainty.`
          : `Does each odds ratio hold once clade and the other traits are allowed for? A contrast is flagged when its odds ratio moves by more than ${formatWholePercent(threshold)} on either adjustment.`
      }
      className="break-inside-avoid"
    >
      <div className="space-y-4" data-testid="confounding-check">
        <p className={cx("rounded-lg px-4 py-3 text-[15px]", flagged.length ? "border border-caution-200 bg-caution-50 text-stone-800" : "bg-stone-50 text-stone-700")}>
          {flagged.length === 0
            ? calibrated
              ? "No contrast is flagged: no odds ratio moves on adjustment by more than the threshold and its own uncertainty together."
              : "No odds ratio moves by more than the threshold on adjustment."
            : `${flagged.length === 1 ? "One contrast is" : `${flagged.length} contrasts are`} flagged as possible confounding: ${flagged.map((r) => `${r.trait.label} (${contrastWords(r.trait, r.contrast)})`).join("; ")}.`}{" "}
          {!explainedAbove &&
            "A trait can track extinction only because both share a cause, for instance when the trait is concentrated in clades that were hit hard for other reasons; the adjusted odds ratios show how much of the association remains within clades and beside the other traits."}
        </p>
        <ResultTable caption={`Crude and adjusted odds ratios with ${percent} intervals, and how far each moves on adjustment`} minWidth="44rem">
          <HeadRow>
            <ColHead>Trait and contrast</ColHead>
            <ColHead numeric>Crude</ColHead>
            <ColHead numeric>For clade</ColHead>
            <th scope="col" className={thNum} title="Breslow-Day test (with Tarone's correction) of one common odds ratio across clades">
              Breslow-Day p
            </th>
            <ColHead numeric>For other traits</ColHead>
            <ColHead numeric>Moves by</ColHead>
          </HeadRow>
          <Body>
            {rows.map(({ trait, contrast }) => (
              <tr key={`${trait.key}:${contrast.contrast}`} data-confounding={trait.key} data-flagged={contrast.flagged ? "true" : "false"} className={contrast.flagged ? "bg-caution-50/60" : undefined}>
                <th scope="row" className={cx(td, "font-medium")}>
                  {trait.label}
                  {contrast.flagged && " "}
                  {contrast.flagged && (
                    <span className="ml-1.5 inline-flex items-center rounded-full bg-caution-200/50 px-2 py-0.5 align-middle text-xs font-semibold text-caution-700">Flagged</span>
                  )}
                  <span className="block text-xs font-normal text-stone-500">{contrastWords(trait, contrast)}</span>
                </th>
                <OddsCell value={contrast.crude.estimate} ci={contrast.crude.ci} />
                <CladeCell contrast={contrast} />
                <td className={tdNum}>{contrast.cladeAdjusted?.breslowDay ? formatP(contrast.cladeAdjusted.breslowDay.pValue) : "—"}</td>
                <OddsCell value={contrast.modelAdjusted?.estimate} ci={contrast.modelAdjusted?.ci} />
                <td className={cx(tdNum, "text-xs", contrast.flagged && "font-semibold text-caution-700")}>{moveWords(contrast)}</td>
              </tr>
            ))}
          </Body>
        </ResultTable>
        {calibrated && explainedAbove ? (
          <p className="text-sm text-stone-600" data-testid="confounding-method">
            <span className="font-medium text-stone-700">How the flag is decided: </span>
            as under the first boundary of this report.
            {result.design.withoutClade ? ` ${pluralize(result.design.withoutClade, "taxon", "taxa")} without a higher taxon ${result.design.withoutClade === 1 ? "is" : "are"} left out of the clade-adjusted odds ratios.` : ""}
          </p>
        ) : calibrated ? (
          <p className="text-sm text-stone-600" data-testid="confounding-method">
            <span className="font-medium text-stone-700">How the flag is decided. </span>
            {result.confoundingMethod} Moves by: |standardised ÷ crude − 1| with the p-value of the move against its bootstrap standard error. The clade column gives the
            within-clade odds ratio and how many clades carry information. A small Breslow-Day p says the odds ratio differs between clades, so one common figure
            summarises them poorly.
            {result.design.withoutClade ? ` ${pluralize(result.design.withoutClade, "taxon", "taxa")} without a higher taxon ${result.design.withoutClade === 1 ? "is" : "are"} left out of the clade-adjusted odds ratios.` : ""}
            {result.design.withQualifiedClade ? ` ${pluralize(result.design.withQualifiedClade, "taxon", "taxa")} ${result.design.withQualifiedClade === 1 ? "has" : "have"} a qualified higher taxon (?, cf., aff.): ${QUALIFIED_HIGHER_TAXON_RULE.charAt(0).toLowerCase()}${QUALIFIED_HIGHER_TAXON_RULE.slice(1)}` : ""}
          </p>
        ) : (
          <p className="text-sm text-stone-600">
            The {formatWholePercent(threshold)} change-in-estimate rule is a rule of thumb of common practice, not a statistical test. Moves by: |adjusted ÷ crude − 1| for clade and
            for the other traits. This run was computed before the calibrated flag; re-run it to flag only moves larger than their own uncertainty.
          </p>
        )}
        {notes.length > 0 && (
          <ul className="list-disc space-y-1 pl-5 text-sm text-stone-600">
            {notes.map((note) => (
              <li key={note}>{note}</li>
            ))}
          </ul>
        )}
      </div>
    </Card>
  );
}
