import { adjustPValues } from "../stats";
import { cladeAdjustedSlope } from "./cladeAdjustedSlope";
import { chooseReference } from "./chooseReference";
import { confoundingCheck } from "./confoundingCheck";
import { encodeTrait, type DropReason } from "./encodeTrait";
import { fitSelectivityModel, type ModelTraitInput } from "./fitSelectivityModel";
import { formatNumber } from "./formatNumber";
import { quartileBins } from "./quartileBins";
import { numericStep, scaleNumericTrait } from "./scaleNumericTrait";
import { countStates, stateRows } from "./stateTable";
import { countCladeStates, stateContrasts } from "./stateContrasts";
import { testNumericTrait } from "./testNumericTrait";
import { testStateTrait, type TraitTest } from "./testStateTrait";
import type { ContrastResult, SelectivityInput, SelectivityResult, SelectivityTaxon, StateRow, TraitResult } from "./types";

const CORRECTIONS = ["bh", "holm", "bonferroni"];
const NO_CLADE = "(no clade given)";

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
  const n = taxa.length;

  const outcome = new Uint8Array(n);
  const clade = new Int32Array(n);
  const cladeIndex = new Map<string, number>();
  const cladeNames: string[] = [];
  let victims = 0;
  for (let i = 0; i < n; i++) {
    const taxon = taxa[i];
    outcome[i] = taxon.outcome;
    victims += taxon.outcome;
    const name = typeof taxon.clade === "string" && taxon.clade.trim() !== "" ? taxon.clade.trim() : NO_CLADE;
    let c = cladeIndex.get(name);
    if (c === undefined) {
      c = cladeNames.length;
      cladeIndex.set(name, c);
      cladeNames.push(name);
    }
    clade[i] = c;
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
        contrasts = stateContrasts(spec, counts, chosen.index, byClade, cladeNames, level);
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
        const withinClades = cladeAdjustedSlope(spec, encoded.transformed, outcome, clade, cladeNames, scaling, level);
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
      return { ...contrast, modelAdjusted, notes };
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
  }

  return {
    design: { victims, survivors: n - victims, droppedByTrait, completeCases: fit.completeCases },
    traits: results,
    model: fit.model,
    modelNote: fit.modelNote,
  };
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
