import { describe, expect, it } from "vitest";
import { parseCsv } from "../../../shared/csv/parse";
import { blankMissingTokens } from "../../../shared/imports/missingTokens";
import { namesInColumn, renameInColumn } from "../../../shared/imports/nameHygiene";
import { importChecks } from "../../../shared/imports/importChecks";

// A hand-made file of invented taxa: rows 2-11 (the header is row 1).
const CSV = [
  "name,order,fad",
  "Idiocrista,Strovelida,452",
  "idiocrista,Strovelida,451",
  "Ortambelites,Ortevida?,455",
  "Platyvelia,Indet.,458",
  "Rafivelina,Strovelida,450",
  "Sowavella,Strovelida,449",
  "Dalvorella,Ortevida,460",
  "Hebrinella,Ortevida,462",
  "Glyptevis,Ortevida,4",
  "Plaevomys,Ortevida,457",
].join("\n");

describe("renameInColumn and namesInColumn", () => {
  it("reads merged spellings as the chosen one and leaves other rows shared", () => {
    const parsed = parseCsv(CSV);
    const renamed = renameInColumn(parsed, "name", { idiocrista: "Idiocrista" });
    expect(renamed.rows[1]!.cells[0]).toBe("Idiocrista");
    expect(renamed.rows[0]).toBe(parsed.rows[0]);
    expect(parsed.rows[1]!.cells[0]).toBe("idiocrista");
    expect(namesInColumn(parsed, "name").slice(0, 2)).toEqual([
      { row: 2, name: "Idiocrista" },
      { row: 3, name: "idiocrista" },
    ]);
    expect(namesInColumn(parsed, null)).toEqual([]);
  });
});

describe("importChecks", () => {
  it("puts the checks of one file together, against the file's own span when the study has no ages", () => {
    const { parsed, read } = blankMissingTokens(parseCsv(CSV), ["Indet."]);
    const ages = parsed.rows.map((r) => ({ row: r.row, column: "fad", taxon: r.cells[0]!, ma: Number(r.cells[2]) }));
    const checks = importChecks({
      missingTokens: ["Indet."],
      missingRead: read,
      fileNames: namesInColumn(parsed, "name"),
      studyNames: [],
      merges: {},
      ages,
      studySpan: null,
      higherTaxa: parsed.rows.map((r) => ({ row: r.row, higherTaxon: r.cells[1] })),
      fileHigherTaxa: namesInColumn(parsed, "order"),
      studyHigherTaxa: ["STROVELIDA", "Ortevida"],
      higherTaxonMerges: {},
    });
    // Ten ages sorted: 4, 449, 450, 451, 452, 455, 457, 458, 460, 462. Nearest rank: Q1 = ceil(2.5) = 3rd = 450,
    // Q3 = ceil(7.5) = 8th = 458. 4 <= 450 / 10: an interval number; nothing else is 10 Myr beyond 450-458.
    expect(checks.ageSpan).toEqual({ oldestMa: 458, youngestMa: 450, source: "file" });
    expect(checks.warnings.map((w) => [w.row, w.taxon, w.kind])).toEqual([[10, "Glyptevis", "age_interval_number"]]);
    expect(checks.warningCount).toBe(1);
    expect(checks.missingRead).toEqual([{ column: "order", token: "Indet.", count: 1, firstRows: [5] }]);
    expect(checks.similarNames.map((g) => g.spellings.map((s) => s.name))).toEqual([["Idiocrista", "idiocrista"]]);
    // Strovelida (rows 2, 3, 6, 7) against the study's STROVELIDA; "Ortevida?" is qualified, so it is not
    // offered as a spelling of Ortevida, and Ortevida alone is spelt one way.
    expect(checks.similarHigherTaxa).toEqual([
      {
        key: "strovelida",
        spellings: [
          { name: "STROVELIDA", fileRows: 0, firstRows: [], inStudy: true },
          { name: "Strovelida", fileRows: 4, firstRows: [2, 3, 6, 7], inStudy: false },
        ],
        mergedInto: null,
      },
    ]);
    expect(checks.qualifiedHigherTaxa).toEqual([{ name: "Ortevida?", base: "Ortevida", qualifier: "?", rows: 1, firstRow: 4 }]);
  });
});
