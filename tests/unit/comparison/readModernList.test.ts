import { describe, expect, it } from "vitest";
import { suggestModernListMapping, validateModernListRows } from "@shared/comparison";
import { parseCsv } from "@shared/csv";
import { IUCN_CATEGORIES, IUCN_ORDINAL, readIucnCategory, threatGroup } from "@shared/iucn";
import { modernListMappingSchema } from "@shared/schemas/modernLists";

describe("IUCN Red List Categories and Criteria 3.1 (IUCN 2012)", () => {
  it("has the nine categories, highest risk first, DD and NE last", () => {
    expect(IUCN_CATEGORIES).toEqual(["EX", "EW", "CR", "EN", "VU", "NT", "LC", "DD", "NE"]); // IUCN (2012), section on the categories
  });

  it("calls CR, EN and VU threatened, as the standard does, and sets NT and LC against them", () => {
    expect(IUCN_CATEGORIES.filter((c) => threatGroup(c) === "threatened")).toEqual(["CR", "EN", "VU"]); // IUCN (2012) definition of "threatened"
    expect(IUCN_CATEGORIES.filter((c) => threatGroup(c) === "notThreatened")).toEqual(["NT", "LC"]);
    expect(IUCN_CATEGORIES.filter((c) => threatGroup(c) === "extinct")).toEqual(["EX", "EW"]);
    expect(IUCN_CATEGORIES.filter((c) => threatGroup(c) === "noRiskLevel")).toEqual(["DD", "NE"]);
  });

  it("orders LC 0 to CR 4 for the rank correlation", () => {
    // Red List Index weights (Butchart et al. 2004, 2007; citations from memory, docs/sources.md section 9).
    expect(IUCN_ORDINAL).toEqual({ LC: 0, NT: 1, VU: 2, EN: 3, CR: 4 });
  });

  it("reads codes and names case-blind", () => {
    expect(readIucnCategory(" vu ")).toBe("VU");
    expect(readIucnCategory("Critically  endangered")).toBe("CR");
    expect(readIucnCategory("Extinct in the Wild")).toBe("EW");
    expect(readIucnCategory("threatened")).toBeNull();
  });
});

describe("reading a modern list", () => {
  const csv = [
    "Species;Family;Red list category;Habit;Length (cm)",
    "Tarsella alta (invented);Tarsellidae;CR;digging;2,5",
    "Morvia plana (invented);Morviidae;least concern;clinging;1,1",
    ";Morviidae;LC;clinging;1",
    "Tarsella alta (invented);Tarsellidae;EN;digging;2",
    "Quenna rubra (invented);Quennidae;threatened;roaming;3",
    "Aulora minuta (invented);Auloridae;;roaming;",
  ].join("\n");
  const parsed = parseCsv(csv);

  it("guesses the name, higher taxon and category columns and offers the rest as traits", () => {
    expect(suggestModernListMapping(parsed.header)).toEqual({ name: "Species", higherTaxon: "Family", category: "Red list category", traitColumns: ["Habit", "Length (cm)"] });
  });

  it("lists every problem by spreadsheet row and column, keeping trait cells as written", () => {
    const mapping = modernListMappingSchema.parse({ name: "Species", higherTaxon: "Family", category: "Red list category", traitColumns: ["Habit", "Length (cm)"] });
    const result = validateModernListRows(parsed, mapping);
    expect(result.problems).toEqual([
      { row: 4, column: "Species", message: "Species name is missing" },
      { row: 5, column: "Species", message: 'Duplicate species "Tarsella alta (invented)": also on row 2' },
      {
        row: 6,
        column: "Red list category",
        message:
          'Unknown threat category "threatened": use an IUCN 3.1 code or name: EX (Extinct), EW (Extinct in the Wild), CR (Critically Endangered), EN (Endangered), VU (Vulnerable), NT (Near Threatened), LC (Least Concern), DD (Data Deficient), NE (Not Evaluated)',
      },
      { row: 7, column: "Red list category", message: "Threat category is missing (use NE for a species not evaluated)" },
    ]);
    expect(result.invalidRowCount).toBe(4);
    expect(result.rows).toEqual([
      { row: 2, name: "Tarsella alta (invented)", higherTaxon: "Tarsellidae", category: "CR", traits: { Habit: "digging", "Length (cm)": "2,5" } },
      { row: 3, name: "Morvia plana (invented)", higherTaxon: "Morviidae", category: "LC", traits: { Habit: "clinging", "Length (cm)": "1,1" } },
    ]);
  });

  it("refuses a line break in a higher taxon, as the API's one-line fields do", () => {
    const text = parseCsv('Species,Family,Category\nAlba rosea (invented),"Albi\ndae",LC\n');
    const mapping = modernListMappingSchema.parse({ name: "Species", higherTaxon: "Family", category: "Category", traitColumns: [] });
    expect(validateModernListRows(text, mapping).problems).toEqual([{ row: 2, column: "Family", message: "Higher taxon must be one line of text: it holds a line break" }]);
  });

  it("refuses a mapping that uses one column twice", () => {
    const result = modernListMappingSchema.safeParse({ name: "Species", category: "Species" });
    expect(result.success).toBe(false);
    expect(result.error!.issues[0]).toMatchObject({ path: ["category"], message: 'Column "Species" is already used for the species name' });
  });
});
