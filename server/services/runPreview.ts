// A run's preview: what would enter the analysis, per boundary and trait (victims and survivors
// used, values left out and why, the reference state), read exactly as a run reads it, without
// testing anything.
import type { Database } from "../db";
import { chooseReference, countStates, encodeTrait } from "../../shared/selectivity/index";
import type { RunParams, RunPreview } from "../../shared/schemas/runs";
import { completeCases, outcomeArray, plural, readStudyData, type RunDataSources } from "./runData";

/** Counts of what would enter the analysis, per boundary and trait, without testing anything. */
export async function previewRun(db: Database, sources: RunDataSources, studyId: string, params: RunParams): Promise<RunPreview> {
  const data = await readStudyData(db, sources, studyId, params);
  return {
    boundaries: data.boundaries.map((b) => {
      const outcome = outcomeArray(b.taxa);
      const encoded = data.specs.map((spec) => encodeTrait(spec, b.taxa));
      const traits = data.specs.map((spec, k) => {
        const e = encoded[k];
        let victimsUsed = 0;
        let survivorsUsed = 0;
        for (let i = 0; i < b.taxa.length; i++) {
          const usable = e.kind === "states" ? e.codes[i] >= 0 : !Number.isNaN(e.transformed[i]);
          if (!usable) continue;
          if (outcome[i]) victimsUsed++;
          else survivorsUsed++;
        }
        const notes = e.dropReasons.map((d) => `${plural(d.count, "value")} left out: ${d.reason} (e.g. ${d.examples.join(", ")})`);
        let states: RunPreview["boundaries"][number]["traits"][number]["states"] = [];
        let reference: string | null = null;
        if (e.kind === "states") {
          const counts = countStates(e.codes, outcome, spec.states.length);
          states = spec.states.map((s, j) => ({ code: s.code, label: s.label, victims: counts.victims[j], survivors: counts.survivors[j] }));
          const chosen = chooseReference(spec, counts);
          reference = chosen.index >= 0 ? spec.states[chosen.index].code : null;
          if (chosen.note) notes.push(chosen.note);
          const held = states.filter((s) => s.victims + s.survivors > 0);
          const empty = states.filter((s) => s.victims + s.survivors === 0);
          if (held.length === 1) notes.push(`Only one state (${held[0].label}) holds taxa at risk: there is nothing to compare.`);
          if (empty.length && held.length > 1) notes.push(`No taxa at risk in ${empty.map((s) => s.label).join(", ")}: no odds ratio for ${empty.length === 1 ? "this state" : "these states"}.`);
        }
        return {
          traitId: spec.traitId,
          key: spec.key,
          label: spec.label,
          kind: spec.kind,
          used: e.used,
          victimsUsed,
          survivorsUsed,
          droppedMissing: e.missing,
          droppedInvalid: e.invalid,
          states,
          reference,
          transform: spec.transform,
          standardise: spec.standardise,
          notes,
        };
      });
      const complete = completeCases(encoded, b.taxa.length);
      const window = b.design.windowDefaultFrom ? `${b.design.windowMyr} Myr (the ${b.design.windowDefaultFrom.label})` : `${b.design.windowMyr} Myr`;
      const summary = [
        `Across ${b.design.label}, with a window of ${window} below it: ${plural(b.design.victims + b.design.survivors, "taxon", "taxa")} at risk enter, ${plural(b.design.victims, "victim")} and ${plural(b.design.survivors, "survivor")}; ${plural(b.design.notAtRisk, "taxon", "taxa")} not at risk stay out.`,
        ...traits.map((t) => {
          const dropped = t.droppedMissing + t.droppedInvalid;
          return `${t.label}: ${plural(t.used, "taxon", "taxa")} (${t.victimsUsed} victims, ${t.survivorsUsed} survivors)${dropped ? `, ${plural(dropped, "taxon", "taxa")} dropped for ${t.droppedInvalid ? "missing or unusable values" : "missing values"}` : ""}.`;
        }),
        `${plural(complete, "taxon", "taxa")} have every chosen trait and enter the multiple regression.`,
      ].join(" ");
      return { ...b.design, completeCases: complete, traits, summary };
    }),
  };
}
