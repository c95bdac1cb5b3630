import { adjustPValues } from "../stats";
import { cladeAdjustedSlope } from "./cladeAdjustedSlope";
import { chooseReference } from "./chooseReference";
import { judgeCladeConfounding, judgeStateConfounding, DEFAULT_MIN_INFORMATIVE_CLADES, type CladeCells } from "./cladeConfounding";
import { confoundingCheck, confoundingMethod } from "./confoundingCheck";
import { encodeTrait, type DropReason } from "./encodeTrait";
import { fitSelectivityModel, type ModelTraitInput, type SelectivityModelFit } from "./fitSelectivityModel";
import { judgeModelConfounding, type ModelContrast } from "./modelConfounding";
import { formatNumber } from "./formatNumber";
import { quartileBins } from "./quartileBins";
import { numericStep, scaleNumericTrait } from "./scaleNumericTrait";
import { countStates, stateRows } from "./stateTable";
import { countCladeStates, stateContrasts, type CladeStateCounts } from "./stateContrasts";
import { testNumericTrait } from "./testNumericTrait";
import { testStateTrait, type TraitTest } from "./testStateTrait";
import type { ContrastResult, SelectivityInput, SelectivityResult, SelectivityTaxon, StateRow, TraitResult } from "./types";
import { QUALIFIED_HIGHER_TAXON_RULE, qualifiedHigherTaxon } from "../imports/qualifiedHigherTaxon";

const CORRECTIONS = ["bh", "holm", "bonferroni"];

/**
 * The selectivity analysis of one boundary: for every chosen trait, the table of states (or
 * quartile bins of a numeric trait) by outcome with extinction proportions and Wilson intervals; a
 * test of association (Fisher's exact test for states, a likelihood ratio test of a univariate
 * logistic regression for numbers); odds ratios of each state against the reference, crude and
 * adjusted for clade (Mantel-Haenszel) and for the other traits (multiple logistic regression,
 * Firth's when the data separate), with the change-in-estimate confounding check; and p-values
 * adjusted across all the per-trait tests (Benjamini & Hochberg 1995, Holm 1979 or Bonferroni).
 *
 * Everything returned is plain JSON: quantities that cannot be estimated are null and a note or
 * method text says why. Bad input shapes (an outcome other than 0 or 1, a repeated trait key, an
 * option out of range) throw an Error naming the taxon or option.
 *
 * @example
 * analyzeSelectivity({ taxa, traits: [lifeHabit, bodySize], options: { correction: "bh", forceFirth: false, level: 0.95, confoundingThreshold: 0.1 } })
 * // => { design: { victims: 180, survivors: 232, ... }, traits: [{ key: "life_habit", table: [...], test: { method: "Fisher exact test, ...", pValue: 3e-5, adjustedPValue: 6e-5 }, contrasts: [...] }, ...],
 * //      model: { n: 405, coefficients: [...], ... }, modelNote: null }
 */
export function analyzeSelectivity(input: SelectivityInput): SelectivityResult {
  const { taxa, traits, options } = input;
  validateInput(input);
  const level = options.level;
  const minClades = options.minInformativeClades ?? DEFAULT_MIN_INFORMATIVE_CLADES;
  const n = taxa.length;

  const outcome = new Uint8Array(n);
  const clade = new Int32Array(n);
  const cladeIndex = new Map<string, number>();
  const cladeNames: string[] = [];
  let victims = 0;
  let withoutClade = 0;
  // Qualified higher taxa ("Anavelidae?", "cf. Ortevida") stay clades of their own, as written (QUALIFIED_HIGHER_TAXON_RULE); counted to say so.
  const cladeQualified: boolean[] = [];
  let withQualifiedClade = 0;
  for (let i = 0; i < n; i++) {
    const taxon = taxa[i];
    outcome[i] = taxon.outcome;
    victims += taxon.outcome;
    // Taxa without a clade stay out of every clade-adjusted estimate (no catch-all stratum).
    const name = typeof taxon.clade === "string" ? taxon.clade.trim() : "";
    if (name === "") {
      clade[i] = -1;
      withoutClade++;
      continue;
    }
    let c = cladeIndex.get(name);
    if (c === undefined) {
      c = cladeNames.length;
      cladeIndex.set(name, c);
      cladeNames.push(name);
      cladeQualified.push(qualifiedHigherTaxon(name) !== null);
    }
    clade[i] = c;
    if (cladeQualified[c]) withQualifiedClade++;
  }

  const results: TraitResult[] = [];
  const modelInputs: ModelTraitInput[] = [];
  const droppedByTrait: Record<string, number> = {};
  for (const spec of traits) {
    const encoded = encodeTrait(spec, taxa);
    droppedByTrait[spec.key] = encoded.missing + encoded.invalid;
    const notes = encoded.dropReasons.map((reason) => dropNote(reason, spec.label));
    let table: StateRow[];
    let test: TraitTest;
    let contrasts: ContrastResult[] = [];
    let reference: string | null = null;
    if (encoded.kind === "states") {
      const counts = countStates(encoded.codes, outcome, spec.states.length);
      table = stateRows(spec, counts, level);
      const chosen = chooseReference(spec, counts);
      if (chosen.note) notes.push(chosen.note);
      reference = chosen.index >= 0 ? spec.states[chosen.index].code : null;
      test = testStateTrait(spec, counts);
      if (test.pValue !== null) {
        const byClade = countCladeStates(encoded.codes, clade, outcome, cladeNames.length, spec.states.length);
        contrasts = stateContrasts(spec, counts, chosen.index, byClade, cladeNames, level, minClades).map((contrast) => ({
          ...contrast,
          cladeCheck: judgeStateContrast(contrast, spec, chosen.index, byClade, options, minClades),
        }));
      }
      modelInputs.push({ spec, encoded, reference: chosen.index, scaling: null, untestable: test.pValue === null ? test.method : null });
    } else {
      const scaling = scaleNumericTrait(spec, encoded.transformed);
      table = quartileBins(encoded.raw, outcome, level, spec.unit);
      const own = testNumericTrait(spec, encoded.transformed, outcome, scaling, level);
      test = own.test;
      notes.push(...own.notes);
      if (spec.standardise && !scaling.constant && scaling.count > 1) {
        const values = spec.transform === "log10" ? "log10 values" : "values";
        notes.push(`Odds ratios are per standard deviation (${formatNumber(scaling.scale)}) of the ${values}, centred on their mean (${formatNumber(scaling.center)}).`);
      }
      if (own.crude) {
        const withinClades = cladeAdjustedSlope(spec, encoded.transformed, outcome, clade, cladeNames, scaling, level, minClades);
        const cladeCheck =
          withinClades.conditionalLogOdds === null
            ? null
            : judgeCladeConfounding(withinClades.groups, {
                kind: "numeric",
                conditionalLogOdds: withinClades.conditionalLogOdds,
                threshold: options.confoundingThreshold,
                level,
                minInformativeClades: minClades,
              });
        contrasts = [
          {
            contrast: numericStep(spec),
            state: null,
            reference: null,
            crude: own.crude,
            cladeAdjusted: withinClades.adjusted,
            modelAdjusted: null,
            changeOnCladeAdjustment: null,
            changeOnModelAdjustment: null,
            cladeCheck,
            modelCheck: null,
            flagged: false,
            notes: withinClades.notes,
          },
        ];
      }
      modelInputs.push({ spec, encoded, reference: -1, scaling, untestable: test.pValue === null ? test.method : null });
    }
    results.push({
      key: spec.key,
      label: spec.label,
      kind: spec.kind,
      used: encoded.used,
      droppedMissing: encoded.missing,
      table,
      test: { ...test, adjustedPValue: null },
      contrasts,
      confoundingNote: null,
      reference,
      droppedInvalid: encoded.invalid,
      notes,
    });
  }

  // Multiple-testing correction across every per-trait test that could be done.
  const tested = results.filter((r) => r.test.pValue !== null);
  const adjusted = adjustPValues(
    tested.map((r) => r.test.pValue as number),
    options.correction,
  );
  tested.forEach((r, k) => (r.test.adjustedPValue = adjusted[k]));

  const fit = fitSelectivityModel(modelInputs, outcome, { forceFirth: options.forceFirth, level });
  const inModel = fit.model ? fit.model.encoding.traits.map((t) => t.key) : [];
  const modelChecks = judgeAgainstModel(fit, options);
  for (const result of results) {
    const spec = traits.find((t) => t.key === result.key)!;
    const others = fit.model ? fit.model.encoding.traits.filter((t) => t.key !== result.key).map((t) => t.label) : [];
    const byState = fit.adjusted.get(result.key);
    const withModel = result.contrasts.map((contrast) => {
      const notes = [...contrast.notes];
      let modelAdjusted: ContrastResult["modelAdjusted"] = null;
      if (!fit.model) notes.push(`No odds ratio adjusted for the other traits: ${fit.modelNote ?? "the multiple regression could not be fitted."}`);
      else if (!inModel.includes(result.key)) notes.push(fit.missingReasons.get(result.key) ?? `${spec.label} is not in the multiple regression.`);
      else if (others.length === 0) notes.push("The multiple regression holds no other trait, so there is nothing else to adjust for.");
      else {
        const found = byState?.get(contrast.state ?? "");
        if (found) modelAdjusted = found;
        else if (fit.missingReasons.has(result.key)) notes.push(fit.missingReasons.get(result.key)!);
        else notes.push(`${contrast.contrast}: the state has no taxa among the complete cases of the multiple regression, so it has no model-adjusted odds ratio.`);
      }
      const modelCheck = modelAdjusted ? (modelChecks?.get(result.key)?.get(contrast.state ?? "") ?? null) : null;
      if (modelAdjusted && fit.model?.firth) notes.push("The multiple regression is Firth's (the data separate), so no confounding judgement rests on the adjustment for the other traits.");
      return { ...contrast, modelAdjusted, modelCheck, notes };
    });
    const checked = confoundingCheck(withModel, {
      spec,
      threshold: options.confoundingThreshold,
      otherTraits: others,
      traitTaxa: result.used,
      modelTaxa: fit.model ? fit.model.n : null,
    });
    result.contrasts = checked.contrasts;
    result.confoundingNote = checked.note;
    if (withoutClade > 0 && result.contrasts.some((c) => c.cladeAdjusted)) {
      result.notes.push(`${withoutClade} ${withoutClade === 1 ? "taxon has" : "taxa have"} no higher taxon and ${withoutClade === 1 ? "is" : "are"} left out of the clade-adjusted odds ratios.`);
    }
    if (withQualifiedClade > 0 && result.contrasts.some((c) => c.cladeAdjusted)) {
      result.notes.push(`${withQualifiedClade} ${withQualifiedClade === 1 ? "taxon has" : "taxa have"} a qualified higher taxon (?, cf., aff.). ${QUALIFIED_HIGHER_TAXON_RULE}`);
    }
  }

  return {
    design: { victims, survivors: n - victims, droppedByTrait, completeCases: fit.completeCases, withoutClade, withQualifiedClade },
    confoundingMethod: confoundingMethod(options.confoundingThreshold, level, minClades),
    traits: results,
    model: fit.model,
    modelNote: fit.modelNote,
  };
}

/** The confounding judgements against the multiple regression, for every contrast it holds (none for Firth's fit). */
function judgeAgainstModel(fit: SelectivityModelFit, options: SelectivityInput["options"]): ReturnType<typeof judgeModelConfounding> | null {
  if (!fit.model || fit.model.firth || !fit.design || !fit.y || fit.model.encoding.traits.length < 2) return null;
  const contrasts: ModelContrast[] = [];
  const columns = fit.model.encoding.columns;
  columns.forEach((column, j) => {
    if (column.kind === "numeric") contrasts.push({ key: column.trait, state: "", kind: "numeric", column: j });
    else {
      const traitColumns = columns.map((c, k) => (c.trait === column.trait && k !== j ? k : -1)).filter((k) => k >= 0);
      contrasts.push({ key: column.trait, state: column.state, kind: "state", column: j, traitColumns });
    }
  });
  // The model's own estimates (the same maximum likelihood fit of the same design) spare a refit.
  const fitted = fit.model.coefficients.map((c) => c.estimate);
  return judgeModelConfounding(fit.design, fit.y, contrasts, { threshold: options.confoundingThreshold, level: options.level, fitted });
}

/** The clade confounding judgement of one state against the reference, from the clade-by-state counts. */
function judgeStateContrast(
  contrast: ContrastResult,
  spec: SelectivityInput["traits"][number],
  reference: number,
  byClade: CladeStateCounts,
  options: SelectivityInput["options"],
  minClades: number,
): ContrastResult["cladeCheck"] {
  if (!contrast.cladeAdjusted || contrast.state === null) return null;
  const s = spec.states.findIndex((state) => state.code === contrast.state);
  const { cells, cladeCount, stateCount } = byClade;
  // Each clade's four counts are all the states' judgement needs: no row per taxon is built.
  const cladeCells: CladeCells[] = [];
  for (let c = 0; c < cladeCount; c++) {
    const counts: CladeCells = [cells[2 * (c * stateCount + s)], cells[2 * (c * stateCount + s) + 1], cells[2 * (c * stateCount + reference)], cells[2 * (c * stateCount + reference) + 1]];
    if (counts[0] + counts[1] + counts[2] + counts[3] > 0) cladeCells.push(counts);
  }
  return judgeStateConfounding(cladeCells, {
    kind: "states",
    conditionalLogOdds: Math.log(contrast.cladeAdjusted.estimate),
    threshold: options.confoundingThreshold,
    level: options.level,
    minInformativeClades: minClades,
  });
}

function dropNote(reason: DropReason, label: string): string {
  const examples = reason.examples.join(", ") + (reason.count > reason.examples.length ? ", ..." : "");
  return `${reason.count} ${reason.count === 1 ? "taxon is" : "taxa are"} left out of ${label} for a value that is ${reason.reason} (${examples}).`;
}

function validateInput(input: SelectivityInput): void {
  const fn = "analyzeSelectivity";
  if (!input || !Array.isArray(input.taxa) || !Array.isArray(input.traits) || !input.options) {
    throw new Error(`${fn}: the input needs taxa, traits and options`);
  }
  const { options } = input;
  if (!(typeof options.level === "number" && options.level > 0 && options.level < 1)) {
    throw new Error(`${fn}: options.level is ${String(options.level)}; it must lie strictly between 0 and 1`);
  }
  if (!CORRECTIONS.includes(options.correction)) {
    throw new Error(`${fn}: options.correction is "${String(options.correction)}"; use "bh", "holm" or "bonferroni"`);
  }
  if (!(typeof options.confoundingThreshold === "number" && Number.isFinite(options.confoundingThreshold) && options.confoundingThreshold >= 0)) {
    throw new Error(`${fn}: options.confoundingThreshold is ${String(options.confoundingThreshold)}; it must be a number of 0 or more (0.1 = 10%)`);
  }
  if (options.minInformativeClades !== undefined && !(Number.isInteger(options.minInformativeClades) && options.minInformativeClades >= 1)) {
    throw new Error(`${fn}: options.minInformativeClades is ${String(options.minInformativeClades)}; it must be a whole number of 1 or more`);
  }
  if (typeof options.forceFirth !== "boolean") throw new Error(`${fn}: options.forceFirth must be true or false`);
  const keys = new Set<string>();
  for (const spec of input.traits) {
    if (keys.has(spec.key)) throw new Error(`${fn}: trait "${spec.key}" is listed twice`);
    keys.add(spec.key);
    if (spec.kind !== "numeric") {
      const codes = new Set<string>();
      for (const state of spec.states) {
        if (codes.has(state.code)) throw new Error(`${fn}: trait "${spec.key}" lists the state "${state.code}" twice`);
        codes.add(state.code);
      }
    } else if (spec.transform !== "none" && spec.transform !== "log10") {
      throw new Error(`${fn}: trait "${spec.key}" has transform "${String(spec.transform)}"; use "none" or "log10"`);
    }
  }
  input.taxa.forEach((taxon: SelectivityTaxon, i) => {
    if (taxon.outcome !== 0 && taxon.outcome !== 1) {
      throw new Error(`${fn}: taxon ${i} (${String(taxon.name)}) has outcome ${String(taxon.outcome)}; it must be 1 (victim) or 0 (survivor)`);
    }
    if (!taxon.values || typeof taxon.values !== "object") throw new Error(`${fn}: taxon ${i} (${String(taxon.name)}) has no values`);
  });
}
