// Ages (Ma) and durations (Myr) as the app writes them (shared/format/ages.ts, re-exported by
// src/lib/format.ts). Check values: base ages of the International Chronostratigraphic Chart
// v2024/12 (International Commission on Stratigraphy; Cohen, Harper, Gibbard & Car 2025, Episodes
// 48: 105-115), read from its machine-readable form in tests/fixtures/timescale/ics-chart-2024-12.csv
// (docs/sources.md section 8); the rule that figures set side by side carry the same number of
// decimals is common practice, no source.
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { ageDecimals, agesWriter, formatAgeNumber, formatMa, formatMyr, sharedAgeDecimals } from "../../../shared/format/ages";
import { formatMa as clientFormatMa } from "../../../src/lib/format";

const csvPath = fileURLToPath(new URL("../../fixtures/timescale/ics-chart-2024-12.csv", import.meta.url));

/** The chart's base ages as written in its data file ("66.00", "93.9", "251.902"). */
function chartBases(): Array<{ name: string; written: string }> {
  return readFileSync(csvPath, "utf8")
    .split(/\r?\n/)
    .filter((line) => line.trim() !== "" && !line.startsWith("#") && !line.startsWith("base_ma"))
    .map((line) => {
      const [written, , name] = line.split(",");
      return { name: name!, written: written! };
    });
}

describe("an age alone: every decimal the chart gives, at least one", () => {
  it("writes chart boundaries as the chart gives them", () => {
    // ICS v2024/12: base of the Turonian 93.9 Ma (± 0.2), of the Induan (and the Triassic) 251.902 Ma,
    // of the Gelasian 2.58 Ma, of the Greenlandian 0.0117 Ma, of the Meghalayan 0.0042 Ma.
    expect(formatMa(93.9)).toBe("93.9 Ma");
    expect(formatMa(251.902)).toBe("251.902 Ma");
    expect(formatMa(2.58)).toBe("2.58 Ma");
    expect(formatMa(0.0117)).toBe("0.0117 Ma");
    expect(formatMa(0.0042)).toBe("0.0042 Ma");
    // The data give the Danian's base as "66.00"; a round figure keeps one decimal, never reads "66 Ma".
    expect(formatMa(66)).toBe("66.0 Ma");
    expect(clientFormatMa(66)).toBe("66.0 Ma");
  });

  it("never rounds a base of the chart away: each one reads back as the number the chart file gives", () => {
    const bases = chartBases();
    expect(bases.length).toBe(153);
    for (const { name, written } of bases) {
      const shown = formatAgeNumber(Number(written));
      expect(Number(shown.replace(/,/g, "")), `${name}: ${written} shown as ${shown}`).toBe(Number(written));
      // At most the decimals the file writes (its trailing zeros aside), at least one.
      const fileDecimals = (written.split(".")[1] ?? "").replace(/0+$/, "").length;
      expect(ageDecimals(Number(written)), name).toBe(Math.max(1, fileDecimals));
    }
  });

  it("counts a difference like 100.5 - 93.9 as the 6.6 it is (the Cenomanian's duration)", () => {
    expect(100.5 - 93.9).not.toBe(6.6); // 6.599999999999994 in binary floating point
    expect(ageDecimals(100.5 - 93.9)).toBe(1);
    expect(formatMyr(100.5 - 93.9)).toBe("6.6 Myr");
  });

  it("writes durations the same way: the Cenomanian lasts 100.5 - 93.9 = 6.6 Myr", () => {
    expect(formatMyr(100.5 - 93.9)).toBe("6.6 Myr");
    expect(formatMyr(0.2)).toBe("0.2 Myr");
  });
});

describe("ages shown together: one number of decimals, the most any of them needs", () => {
  it("writes 94 beside 94.41 as 94.00, not 94", () => {
    const ages = agesWriter([94, 94.41, 93.9]);
    expect(ages.decimals).toBe(2);
    expect([94, 94.41, 93.9].map(ages.ma)).toEqual(["94.00 Ma", "94.41 Ma", "93.90 Ma"]);
    expect(ages.number(100.5)).toBe("100.50");
    expect(ages.myr(6.6)).toBe("6.60 Myr");
  });

  it("keeps the chart's neighbours of the K-Pg boundary alike: Danian 66.0, Maastrichtian 72.2, its duration 6.2", () => {
    // ICS v2024/12: Danian base 66.00, Maastrichtian base 72.2 (± 0.2); the Maastrichtian lasts 72.2 - 66.0 = 6.2 Myr.
    const ages = agesWriter([66, 72.2, 72.2 - 66]);
    expect([ages.ma(66), ages.ma(72.2), ages.myr(72.2 - 66)]).toEqual(["66.0 Ma", "72.2 Ma", "6.2 Myr"]);
  });

  it("follows the finest age of the view: the Permian-Triassic boundary beside the Changhsingian's base", () => {
    // ICS v2024/12: Induan base 251.902 (± 0.024), Changhsingian base 254.14 (± 0.07).
    expect(sharedAgeDecimals([251.902, 254.14, 0.024])).toBe(3);
    expect(agesWriter([251.902, 254.14]).ma(254.14)).toBe("254.140 Ma");
  });

  it("passes over missing ages and caps at four decimals", () => {
    expect(sharedAgeDecimals([null, undefined, 94])).toBe(1);
    expect(sharedAgeDecimals([])).toBe(1);
    expect(formatMa(94.123456, sharedAgeDecimals([94.123456]))).toBe("94.1235 Ma");
  });

  it("groups thousands as the rest of the app does", () => {
    // The age of the Earth, the limit every age field checks (4,567 Ma; common practice, no source).
    expect(formatMa(4567)).toBe("4,567.0 Ma");
  });
});
