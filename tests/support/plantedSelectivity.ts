// An invented study with planted selectivity, shared by the API and browser tests of runs.
//
// Eight invented clades of an invented basin; two are hard hit by the crisis. Most members of the
// hard-hit clades burrow (infaunal), few elsewhere. Suspension feeders die more often in every
// clade: 0.8 against 0.6 in the hard-hit clades, 0.4 against 0.2 elsewhere, an odds ratio of 8/3
// within each clade (worked by hand: (0.8/0.2)/(0.6/0.4) = 4/1.5 and (0.4/0.6)/(0.2/0.8) =
// (2/3)/(1/4), both 8/3). Life habit has no effect of its own: within a clade both habits die at
// the same rate, so its clade-adjusted (Mantel-Haenszel) odds ratio is exactly 1, while crudely it
// tracks the hard-hit clades. Cells are multiples of 5, so every planted proportion is met exactly.
export const HARD_HIT = ["Caldorridae", "Vesperinidae"];
export const SPARED = ["Lumaquidae", "Orrentidae", "Pallisidae", "Quillatidae", "Sabranidae", "Tethrinidae"];
const PER_CLADE = 50;
const P_VICTIM = { hard: { suspension: 0.8, deposit: 0.6 }, spared: { suspension: 0.4, deposit: 0.2 } };
/** Extra taxa of a spared clade with no life habit coded (they enter the feeding test only), planted with the same rates. */
export const NO_HABIT = 10;
/** Taxa the tests add outside the boundary's window. */
export const NOT_AT_RISK = 30;

export interface PlantedTaxon {
  name: string;
  clade: string;
  feeding: "suspension" | "deposit";
  habit: "infaunal" | "epifaunal" | null;
  victim: boolean;
}

/** The planted taxa, named `<genus> 001 (invented)` onwards. */
export function plantedTaxa(genus: string): PlantedTaxon[] {
  const out: PlantedTaxon[] = [];
  let serial = 0;
  const cell = (clade: string, habit: PlantedTaxon["habit"], n: number) => {
    const rates = P_VICTIM[HARD_HIT.includes(clade) ? "hard" : "spared"];
    for (const feeding of ["suspension", "deposit"] as const) {
      const victims = Math.round((n / 2) * rates[feeding]);
      for (let k = 0; k < n / 2; k++) out.push({ name: `${genus} ${String(++serial).padStart(3, "0")} (invented)`, clade, feeding, habit, victim: k < victims });
    }
  };
  for (const clade of [...HARD_HIT, ...SPARED]) {
    const infaunal = HARD_HIT.includes(clade) ? 40 : 10; // 80% of hard-hit clades burrow, 20% of the others
    cell(clade, "infaunal", infaunal);
    cell(clade, "epifaunal", PER_CLADE - infaunal);
  }
  cell(SPARED[0], null, NO_HABIT);
  return out;
}
