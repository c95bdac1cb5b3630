import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { ICS_2024_12_ROWS } from "@shared/timescale";

// The committed data module must match, row for row, the chart's machine-readable form as read from
// the ICS chart data (tests/fixtures/timescale/ics-chart-2024-12.csv; docs/sources.md section 8).
const csvPath = fileURLToPath(new URL("../../fixtures/timescale/ics-chart-2024-12.csv", import.meta.url));

function readCsvRows() {
  const lines = readFileSync(csvPath, "utf8")
    .split(/\r?\n/)
    .filter((line) => line.trim() !== "" && !line.startsWith("#"));
  const header = lines.shift();
  expect(header).toBe("base_ma,uncertainty_ma,name,rank,parent,gssp_ratified");
  return lines.map((line) => {
    const [base, uncertainty, name, rank, parent, gssp] = line.split(",");
    return {
      name,
      rank,
      parent,
      base: Number(base),
      uncertainty: uncertainty === "" ? null : Number(uncertainty),
      gsspRatified: gssp === "true",
    };
  });
}

describe("ICS v2024/12 data module", () => {
  it("holds exactly the rows of the chart file in tests/fixtures", () => {
    expect(ICS_2024_12_ROWS).toEqual(readCsvRows());
  });
  it("holds only Phanerozoic units (no base older than the Cambrian's 538.8 Ma)", () => {
    // Cambrian base 538.8 Ma: ICS chart v2024/12 (Cohen et al. 2025), docs/sources.md section 8.
    expect(Math.max(...ICS_2024_12_ROWS.map((r) => r.base))).toBe(538.8);
  });
});
