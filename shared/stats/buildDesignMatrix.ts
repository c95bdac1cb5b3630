import type { LogisticTerm } from "./logisticRegression";
import type { FlatMatrix } from "./types";

/** One predictor: a number per row, or a category per row. */
export type DesignVariable =
  | {
      name: string;
      kind: "numeric";
      values: number[];
      /** Centre on the mean and divide by the sample standard deviation (n - 1). Default false. */
      standardize?: boolean;
    }
  | {
      name: string;
      kind: "categorical";
      values: Array<string | number | boolean>;
      /** Level order; default: the observed values sorted. Levels with no rows are left out. */
      levels?: string[];
      /** Level coded by all-zero dummies; default the first level. */
      reference?: string;
    };

export type VariableEncoding =
  | { name: string; kind: "numeric"; column: number; center: number; scale: number }
  | { name: string; kind: "categorical"; columns: number[]; reference: string; levels: string[]; emptyLevels: string[] };

export interface DesignMatrix extends FlatMatrix {
  /** Column names: the variable name for numbers, "name=level" for the dummy of a level. */
  names: string[];
  /** One term per variable, listing its columns, for likelihood ratio tests of whole variables. */
  terms: LogisticTerm[];
  /** How each variable was coded, to read coefficients back (e.g. per-SD effects). */
  encodings: VariableEncoding[];
}

const FN = "buildDesignMatrix";

/**
 * Builds the predictor matrix of a regression from named variables (without an intercept column;
 * logisticRegression adds it). Numeric variables become one column, optionally standardised to
 * mean 0 and standard deviation 1. Categorical variables are dummy (treatment) coded: one 0/1
 * column per level except the reference level, so each coefficient is a log odds ratio against
 * the reference (Suits 1957). Each variable is also returned as a term spanning its columns.
 *
 * @example
 * buildDesignMatrix([
 *   { name: "habitat", kind: "categorical", values: ["reef", "basin", "shelf"], reference: "shelf" },
 *   { name: "size", kind: "numeric", values: [2, 4, 9] },
 * ])
 * // => names ["habitat=basin", "habitat=reef", "size"], rows [[0, 1, 2], [1, 0, 4], [0, 0, 9]],
 * //    terms [{ name: "habitat", columns: [0, 1] }, { name: "size", columns: [2] }]
 */
export function buildDesignMatrix(variables: DesignVariable[]): DesignMatrix {
  if (!Array.isArray(variables) || variables.length === 0) throw new Error(`${FN}: at least one variable is needed`);
  const rows = variables[0].values?.length ?? 0;
  if (rows === 0) throw new Error(`${FN}: variable "${variables[0].name}" has no values`);
  const seenNames = new Set<string>();
  const columnsData: Float64Array[] = [];
  const names: string[] = [];
  const terms: LogisticTerm[] = [];
  const encodings: VariableEncoding[] = [];

  for (const variable of variables) {
    if (!variable || typeof variable.name !== "string" || variable.name === "") throw new Error(`${FN}: every variable needs a name`);
    const { name } = variable;
    if (seenNames.has(name)) throw new Error(`${FN}: variable "${name}" appears twice`);
    seenNames.add(name);
    if (!Array.isArray(variable.values) || variable.values.length !== rows) {
      throw new Error(`${FN}: variable "${name}" has ${variable.values?.length ?? 0} values but "${variables[0].name}" has ${rows} (lengths must match)`);
    }
    if (variable.kind === "numeric") {
      const column = new Float64Array(rows);
      for (let i = 0; i < rows; i++) {
        const v = variable.values[i];
        if (typeof v !== "number" || !Number.isFinite(v)) {
          throw new Error(`${FN}: variable "${name}" has ${v === null || v === undefined ? "a missing value" : `the value ${String(v)}`} at row ${i}; values must be finite numbers`);
        }
        column[i] = v;
      }
      let center = 0;
      let scale = 1;
      if (variable.standardize) {
        for (let i = 0; i < rows; i++) center += column[i];
        center /= rows;
        let sumSquares = 0;
        for (let i = 0; i < rows; i++) sumSquares += (column[i] - center) ** 2;
        scale = rows > 1 ? Math.sqrt(sumSquares / (rows - 1)) : 0;
        if (!(scale > 0)) throw new Error(`${FN}: variable "${name}" is constant and cannot be standardised`);
        for (let i = 0; i < rows; i++) column[i] = (column[i] - center) / scale;
      }
      terms.push({ name, columns: [names.length] });
      encodings.push({ name, kind: "numeric", column: names.length, center, scale });
      names.push(name);
      columnsData.push(column);
    } else if (variable.kind === "categorical") {
      const labels = variable.values.map((v, i) => {
        if (v === null || v === undefined || (typeof v === "string" && v.trim() === "") || (typeof v === "number" && !Number.isFinite(v))) {
          throw new Error(`${FN}: variable "${name}" has a missing value at row ${i}`);
        }
        return String(v);
      });
      const observed = new Set(labels);
      let levels: string[];
      if (variable.levels) {
        levels = variable.levels.map(String);
        if (new Set(levels).size !== levels.length) throw new Error(`${FN}: variable "${name}" lists a level twice`);
        const known = new Set(levels);
        const unknown = labels.find((label) => !known.has(label));
        if (unknown !== undefined) throw new Error(`${FN}: variable "${name}" has the value "${unknown}", which is not among its levels`);
      } else {
        levels = [...observed].sort();
      }
      const emptyLevels = levels.filter((level) => !observed.has(level));
      const present = levels.filter((level) => observed.has(level));
      const reference = variable.reference ?? present[0];
      if (!levels.includes(reference)) throw new Error(`${FN}: reference "${reference}" is not a level of "${name}"`);
      if (!observed.has(reference)) throw new Error(`${FN}: reference "${reference}" of "${name}" has no rows`);
      if (present.length < 2) throw new Error(`${FN}: variable "${name}" has only one observed level ("${reference}"); it cannot be estimated`);
      const columns: number[] = [];
      // Each row's level looked up once, not compared with every level's name.
      const levelOf = new Map(present.map((level, k) => [level, k]));
      const rowLevel = Int32Array.from(labels, (label) => levelOf.get(label)!);
      present.forEach((level, k) => {
        if (level === reference) return;
        const column = new Float64Array(rows);
        for (let i = 0; i < rows; i++) column[i] = rowLevel[i] === k ? 1 : 0;
        columns.push(names.length);
        names.push(`${name}=${level}`);
        columnsData.push(column);
      });
      terms.push({ name, columns });
      encodings.push({ name, kind: "categorical", columns, reference, levels: present, emptyLevels });
    } else {
      throw new Error(`${FN}: variable "${name}" has kind "${String((variable as { kind: unknown }).kind)}"; use "numeric" or "categorical"`);
    }
  }

  const columnCount = names.length;
  const data = new Float64Array(rows * columnCount);
  for (let j = 0; j < columnCount; j++) {
    const column = columnsData[j];
    for (let i = 0; i < rows; i++) data[i * columnCount + j] = column[i];
  }
  return { data, rows, columns: columnCount, names, terms, encodings };
}
