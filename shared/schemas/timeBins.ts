// A study's own time bins: ordered intervals (regional stages, numbered slices) with base and top in
// Ma, optionally tied to a unit of the ICS chart. One schema checks a set of bins in the editor, in a
// CSV upload and on the server, naming the row and the column at fault.
import { z } from "zod";
import { findUnit } from "../timescale/lookup";
import { timeBinKey } from "../timebins/intervalLookup";
import { AGE_LIMIT_MA, isoDateSchema, oneLine, personOrNoneSchema } from "./common";

/** Bins one study may define. */
export const TIME_BINS_MAX = 500;
/** Ages equal within this (Myr) are the same age: a bin may start exactly where the previous one ends. */
const SAME_AGE_MYR = 1e-9;

const ageSchema = (label: string) =>
  z
    .number({ message: `${label} must be a number of Ma` })
    .refine(Number.isFinite, `${label} must be a finite number of Ma`)
    .refine((v) => v >= 0, `${label} must not be negative (ages are in Ma before present)`)
    .refine((v) => v <= AGE_LIMIT_MA, `${label} must be at most ${AGE_LIMIT_MA.toLocaleString("en-US")} Ma: nothing is older than the Earth`);

const formatMa = (ma: number) => `${Number(ma.toFixed(6))} Ma`;

/** One bin as a person gives it. */
export const timeBinInputSchema = z
  .strictObject({
    name: z.string({ message: "Name is required" }).trim().min(1, "Name is required").max(120, "Name must have at most 120 characters").check(oneLine("Name")),
    baseMa: ageSchema("Base").meta({ description: "Older limit in Ma" }),
    topMa: ageSchema("Top").meta({ description: "Younger limit in Ma" }),
    chartUnit: z
      .string()
      .trim()
      .max(100, "Chart unit must have at most 100 characters")
      .nullable()
      .default(null)
      .refine((v) => v === null || v === "" || findUnit(v) !== undefined, "Chart unit is not a unit of the ICS chart (e.g. Katian, Upper Ordovician)")
      .meta({ description: "The ICS chart unit the bin is tied to (correlates with); null or empty for none" }),
  })
  .superRefine((bin, ctx) => {
    if (!(bin.baseMa > bin.topMa)) {
      ctx.addIssue({ code: "custom", path: ["topMa"], message: `Base (${formatMa(bin.baseMa)}) must be older than top (${formatMa(bin.topMa)}): ages are in Ma, larger is older` });
    }
    const unit = bin.chartUnit ? findUnit(bin.chartUnit) : undefined;
    // A tie says the bin correlates with the unit: they must share some time (an exact match is not asked, regional units rarely match).
    if (unit && bin.baseMa > bin.topMa && !(bin.baseMa > unit.top && unit.base > bin.topMa)) {
      ctx.addIssue({
        code: "custom",
        path: ["chartUnit"],
        message: `The bin (${formatMa(bin.baseMa)} to ${formatMa(bin.topMa)}) does not overlap ${unit.label} (${formatMa(unit.base)} to ${formatMa(unit.top)})`,
      });
    }
  })
  .meta({ id: "TimeBinInput" });
export type TimeBinInput = z.input<typeof timeBinInputSchema>;
export type TimeBinValues = z.output<typeof timeBinInputSchema>;

/**
 * The problems of a whole set of bins, by index and field: names used twice, bins not listed oldest
 * first, bins that overlap. Each bin's own checks are in timeBinInputSchema.
 */
export function timeBinSetProblems(bins: ReadonlyArray<{ name: string; baseMa: number; topMa: number }>): Array<{ index: number; field: "name" | "baseMa"; message: string }> {
  const problems: Array<{ index: number; field: "name" | "baseMa"; message: string }> = [];
  const firstByKey = new Map<string, number>();
  bins.forEach((bin, i) => {
    const key = timeBinKey(bin.name);
    if (!key) return;
    const first = firstByKey.get(key);
    if (first === undefined) firstByKey.set(key, i);
    else problems.push({ index: i, field: "name", message: `The name “${bin.name.trim()}” is already used by bin ${first + 1} (names are matched ignoring case, spaces and how a number is written)` });
  });
  for (let i = 1; i < bins.length; i++) {
    const previous = bins[i - 1]!;
    const bin = bins[i]!;
    if (![previous.baseMa, previous.topMa, bin.baseMa, bin.topMa].every(Number.isFinite) || !(previous.baseMa > previous.topMa) || !(bin.baseMa > bin.topMa)) continue;
    if (bin.baseMa >= previous.baseMa) {
      problems.push({
        index: i,
        field: "baseMa",
        message: `Bins go from oldest to youngest: this bin's base (${formatMa(bin.baseMa)}) is not younger than the base of bin ${i} “${previous.name.trim()}” (${formatMa(previous.baseMa)})`,
      });
    } else if (bin.baseMa > previous.topMa + SAME_AGE_MYR) {
      problems.push({
        index: i,
        field: "baseMa",
        message: `Overlaps bin ${i} “${previous.name.trim()}”: this bin's base (${formatMa(bin.baseMa)}) is older than that bin's top (${formatMa(previous.topMa)})`,
      });
    }
  }
  return problems;
}

/** The study's whole set of bins, oldest first; saving replaces the set. */
export const timeBinSetSchema = z
  .strictObject({
    bins: z
      .array(timeBinInputSchema, { message: "bins must be a list of time bins" })
      .max(TIME_BINS_MAX, `At most ${TIME_BINS_MAX} time bins per study`)
      .meta({ description: "Oldest first, not overlapping (gaps are allowed); an empty list removes the study's bins" }),
  })
  .superRefine((set, ctx) => {
    for (const p of timeBinSetProblems(set.bins)) ctx.addIssue({ code: "custom", path: ["bins", p.index, p.field], message: p.message });
  })
  .meta({ id: "TimeBinSet" });
export type TimeBinSetInput = z.input<typeof timeBinSetSchema>;

export const timeBinSchema = z
  .object({
    position: z.number().int().meta({ description: "1 for the oldest bin" }),
    name: z.string(),
    baseMa: z.number(),
    topMa: z.number(),
    chartUnit: z.string().nullable(),
  })
  .meta({ id: "TimeBin" });
export type TimeBin = z.infer<typeof timeBinSchema>;

export const timeBinListSchema = z
  .object({
    bins: z.array(timeBinSchema).meta({ description: "Oldest first" }),
    resolutionOrder: z.string().meta({ description: "How an interval name is read: study bins first, then the ICS chart" }),
    shadowedChartUnits: z
      .array(z.object({ bin: z.string(), chartUnit: z.string() }))
      .meta({ description: "Bins whose name is also a chart unit's name: there the bin is used" }),
    updatedAt: isoDateSchema.nullable(),
    updatedBy: personOrNoneSchema,
  })
  .meta({ id: "TimeBinList" });
export type TimeBinList = z.infer<typeof timeBinListSchema>;

export const timeBinProblemSchema = z
  .object({
    row: z.number().int().meta({ description: "Row as a spreadsheet shows it: the header is row 1" }),
    column: z.string().nullable().meta({ description: "The CSV header of the cell at fault" }),
    message: z.string(),
  })
  .meta({ id: "TimeBinProblem" });
export type TimeBinProblem = z.infer<typeof timeBinProblemSchema>;

export const timeBinCsvSchema = z
  .object({
    fileName: z.string(),
    columns: z
      .object({ name: z.string().nullable(), baseMa: z.string().nullable(), topMa: z.string().nullable(), chartUnit: z.string().nullable() })
      .meta({ description: "The header read for each part of a bin, null when the file has none" }),
    bins: z
      .array(z.object({ row: z.number().int(), name: z.string(), baseMa: z.number().nullable(), topMa: z.number().nullable(), chartUnit: z.string().nullable() }))
      .meta({ description: "Every data row as read, in file order; nothing is saved until the set is sent to PUT /time-bins" }),
    problems: z.array(timeBinProblemSchema),
  })
  .meta({ id: "TimeBinCsv" });
export type TimeBinCsv = z.infer<typeof timeBinCsvSchema>;

export const timeBinUploadFormSchema = z
  .object({ file: z.string().meta({ format: "binary", description: "CSV with columns name, base_ma, top_ma and optionally chart_unit (comma, semicolon or tab separated)" }) })
  .meta({ id: "TimeBinUploadForm" });

/** Largest time-bin file (a few hundred rows are some kilobytes). */
export const TIME_BIN_CSV_MAX_BYTES = 1024 * 1024;
export const TIME_BIN_CSV_MAX_LABEL = "1 MB";

