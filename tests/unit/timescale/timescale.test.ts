import { describe, expect, it } from "vitest";
import {
  findUnit,
  resolveIntervalRange,
  stageBelow,
  timescaleStages,
  timescaleUnits,
  TIMESCALE_CITATION,
  TIMESCALE_VERSION,
  unitsContaining,
  type TimescaleRank,
  type TimescaleUnit,
} from "@shared/timescale";

function unit(name: string): TimescaleUnit {
  const found = findUnit(name);
  if (!found) throw new Error(`test setup: ${name} missing from the time scale`);
  return found;
}

describe("base ages against the published chart", () => {
  // Source for every value in this block: ICS International Chronostratigraphic Chart v2024/12
  // (Cohen, Harper, Gibbard & Car 2025, Episodes 48: 105-115), values as listed in the chart's
  // machine-readable form (docs/sources.md section 8, table "Requested boundaries").
  it("Silurian base is 443.1 ± 1.0 Ma", () => {
    expect(unit("Silurian").base).toBe(443.1); // ICS chart v2024/12, Cohen et al. 2025
    expect(unit("Silurian").uncertainty).toBe(1.0); // ICS chart v2024/12, Cohen et al. 2025
  });
  it("Famennian base is 372.15 ± 0.46 Ma", () => {
    expect(unit("Famennian").base).toBe(372.15); // ICS chart v2024/12, Cohen et al. 2025
    expect(unit("Famennian").uncertainty).toBe(0.46); // ICS chart v2024/12, Cohen et al. 2025
  });
  it("Triassic base is 251.902 ± 0.024 Ma", () => {
    expect(unit("Triassic").base).toBe(251.902); // ICS chart v2024/12, Cohen et al. 2025
    expect(unit("Triassic").uncertainty).toBe(0.024); // ICS chart v2024/12, Cohen et al. 2025
  });
  it("Jurassic base is 201.4 ± 0.2 Ma", () => {
    expect(unit("Jurassic").base).toBe(201.4); // ICS chart v2024/12, Cohen et al. 2025
    expect(unit("Jurassic").uncertainty).toBe(0.2); // ICS chart v2024/12, Cohen et al. 2025
  });
  it("Paleogene base is 66.0 Ma with no stated uncertainty", () => {
    expect(unit("Paleogene").base).toBe(66.0); // ICS chart v2024/12, Cohen et al. 2025
    expect(unit("Paleogene").uncertainty).toBeNull(); // ICS chart v2024/12: no ± given for the base of the Danian
  });
  it("Cambrian base (base of the Phanerozoic) is 538.8 Ma", () => {
    expect(unit("Cambrian").base).toBe(538.8); // ICS chart v2024/12 (docs/sources.md section 8, period table)
  });
  it("carries the chart's version and citation", () => {
    expect(TIMESCALE_VERSION).toBe("2024/12");
    // Citation as recommended in docs/sources.md section 8 and its implementation notes.
    expect(TIMESCALE_CITATION).toBe(
      "ICS International Chronostratigraphic Chart v2024/12 (Cohen, Harper, Gibbard & Car 2025, Episodes 48: 105-115)",
    );
  });
});

describe("tops", () => {
  it("each unit's top is the base of the next younger unit of the same rank, 0 for the youngest", () => {
    for (const rank of ["Eon", "Era", "Period", "Epoch", "Age"] as TimescaleRank[]) {
      const youngestFirst = timescaleUnits.filter((u) => u.rank === rank).sort((a, b) => a.base - b.base);
      expect(youngestFirst[0].top, `${rank} youngest`).toBe(0);
      for (let i = 1; i < youngestFirst.length; i++) {
        expect(youngestFirst[i].top, `${rank} ${youngestFirst[i].name}`).toBe(youngestFirst[i - 1].base);
      }
    }
  });

  it("gives the tops of chosen units from the chart's bases", () => {
    // ICS chart v2024/12 (Cohen et al. 2025): Danian base 66.00, Induan base 251.902, Lochkovian base 419.62.
    expect(unit("Maastrichtian").top).toBe(66);
    expect(unit("Permian").top).toBe(251.902);
    expect(unit("Changhsingian").top).toBe(251.902);
    expect(unit("Pragian").top).toBe(410.62);
    // Carboniferous subperiods (derived units): Mississippian ends at the Lower Pennsylvanian base 323.4,
    // Pennsylvanian at the Permian base 298.9 (ICS chart v2024/12).
    expect(unit("Mississippian").top).toBe(323.4);
    expect(unit("Pennsylvanian").top).toBe(298.9);
  });

  it("keeps the chart's Aquitanian/Neogene mismatch as read (23.03 against 23.04)", () => {
    // ICS chart v2024/12 machine-readable form: Aquitanian base 23.03, Neogene base 23.04 (docs/sources.md section 8, caveats).
    expect(unit("Chattian").top).toBe(23.03);
    expect(unit("Oligocene").top).toBe(23.04);
    expect(unit("Paleogene").top).toBe(23.04);
  });

  it("stages tile the Phanerozoic from 538.8 Ma to the present without gap or overlap", () => {
    const youngestFirst = [...timescaleStages].sort((a, b) => a.base - b.base);
    expect(youngestFirst[0].top).toBe(0);
    expect(youngestFirst[youngestFirst.length - 1].base).toBe(538.8); // Cambrian base, ICS chart v2024/12
    const totalDuration = youngestFirst.reduce((sum, s) => sum + s.duration, 0);
    expect(totalDuration).toBeCloseTo(538.8, 6);
    // The chart's 101 stages plus the Pridoli, which the data lack (recalled, see units.ts).
    expect(youngestFirst).toHaveLength(102);
  });

  it("places every unit inside its parent, except the Chattian's 0.01 Myr overhang from the 23.03/23.04 mismatch", () => {
    const overhangs: string[] = [];
    for (const child of timescaleUnits) {
      if (child.parent === null) continue;
      const parent = timescaleUnits.find((u) => u.name === child.parent && u.rank !== child.rank);
      expect(parent, `parent of ${child.name}`).toBeDefined();
      if (child.base > parent!.base || child.top < parent!.top) overhangs.push(child.name);
    }
    expect(overhangs).toEqual(["Chattian"]);
  });

  it("reports stage durations free of floating-point residue", () => {
    // 72.2 - 66.00 from the ICS chart v2024/12 bases of the Maastrichtian and Danian.
    expect(unit("Maastrichtian").duration).toBe(6.2);
  });
});

describe("findUnit", () => {
  it("finds units by the chart's identifier, by label, ignoring case, and with Late/Early for Upper/Lower", () => {
    expect(findUnit("UpperCretaceous")?.base).toBe(100.5); // ICS chart v2024/12: Cenomanian base 100.5
    expect(findUnit("upper cretaceous")?.name).toBe("UpperCretaceous");
    expect(findUnit("Late Cretaceous")?.name).toBe("UpperCretaceous");
    expect(findUnit("Early Jurassic")?.name).toBe("LowerJurassic");
    expect(findUnit("Cambrian Stage 10")?.name).toBe("CambrianStage10");
    expect(unit("CambrianStage10").label).toBe("Cambrian Stage 10");
  });
  it("returns undefined for an unknown name", () => {
    expect(findUnit("Atlantisian")).toBeUndefined();
  });
  it("returns the series for the Pridoli, which is both series and stage", () => {
    expect(findUnit("Pridoli")?.rank).toBe("Epoch");
    expect(timescaleStages.some((s) => s.name === "Pridoli")).toBe(true);
  });
});

describe("stageBelow", () => {
  it("gives the Maastrichtian, 6.2 Myr long, below the K-Pg boundary at 66.0 Ma", () => {
    const stage = stageBelow(66.0);
    // ICS chart v2024/12 (Cohen et al. 2025): Maastrichtian base 72.2, Danian base 66.00.
    expect(stage?.name).toBe("Maastrichtian");
    expect(stage?.base).toBe(72.2);
    expect(stage?.top).toBe(66);
    expect(stage?.duration).toBe(6.2);
  });
  it("gives the Changhsingian below the Permian-Triassic boundary and the Hirnantian below the Silurian base", () => {
    expect(stageBelow(251.902)?.name).toBe("Changhsingian"); // ICS chart v2024/12
    expect(stageBelow(443.1)?.name).toBe("Hirnantian"); // ICS chart v2024/12
    expect(stageBelow(443.1)?.duration).toBeCloseTo(2.1, 9); // 445.2 - 443.1, ICS chart v2024/12
  });
  it("gives the stage containing an age that is not a boundary", () => {
    expect(stageBelow(70)?.name).toBe("Maastrichtian");
  });
  it("gives nothing below the oldest stage, and rejects bad ages", () => {
    expect(stageBelow(538.8)).toBeUndefined();
    expect(stageBelow(0)?.name).toBe("Meghalayan");
    expect(() => stageBelow(Number.NaN)).toThrow(/finite age/);
    expect(() => stageBelow(-1)).toThrow(/negative/);
  });
});

describe("unitsContaining", () => {
  it("assigns a boundary age to the unit it is the base of, broadest rank first", () => {
    expect(unitsContaining(66).map((u) => u.name)).toEqual(["Phanerozoic", "Cenozoic", "Paleogene", "Paleocene", "Danian"]);
  });
  it("finds the Carboniferous subperiod of an age", () => {
    expect(unitsContaining(340).map((u) => u.name)).toEqual([
      "Phanerozoic",
      "Paleozoic",
      "Carboniferous",
      "Mississippian",
      "MiddleMississippian",
      "Visean",
    ]);
  });
  it("puts the present in the youngest units and nothing older than the Phanerozoic", () => {
    expect(unitsContaining(0).map((u) => u.name)).toEqual(["Phanerozoic", "Cenozoic", "Quaternary", "Holocene", "Meghalayan"]);
    expect(unitsContaining(600)).toEqual([]);
  });
});

describe("resolveIntervalRange", () => {
  it("takes the base of the first interval and the top of the last", () => {
    // ICS chart v2024/12: Campanian base 83.6, Danian base 66.00 (= Maastrichtian top).
    expect(resolveIntervalRange("Campanian", "Maastrichtian")).toEqual({ fad: 83.6, lad: 66 });
  });
  it("resolves a single interval to its own base and top", () => {
    // ICS chart v2024/12: Famennian base 372.15, Carboniferous base 358.86.
    expect(resolveIntervalRange("Famennian", "Famennian")).toEqual({ fad: 372.15, lad: 358.86 });
  });
  it("mixes ranks", () => {
    // ICS chart v2024/12: Triassic base 251.902; Jurassic ends at the Cretaceous base 143.1.
    expect(resolveIntervalRange("Triassic", "Jurassic")).toEqual({ fad: 251.902, lad: 143.1 });
  });
  it("throws a clear error naming an unknown interval", () => {
    expect(() => resolveIntervalRange("Atlantisian", "Maastrichtian")).toThrow(/Unknown interval "Atlantisian"/);
    expect(() => resolveIntervalRange("Campanian", "Lemurian")).toThrow(/Unknown interval "Lemurian"/);
  });
  it("throws when the names are swapped", () => {
    expect(() => resolveIntervalRange("Maastrichtian", "Campanian")).toThrow(/inverted/);
  });
});
