// Invented Latin-looking names for the demo study, built from syllables with the demo's seeded
// random numbers, so the same seed always gives the same names. None of them is meant to be a real
// taxon; every place that shows them also says the scenario is invented.

/** A seeded source of uniform numbers in [0, 1). */
export type Random = () => number;

/**
 * mulberry32, a small public-domain 32-bit generator. Its quality is ample for drawing an invented data
 * set; what matters here is that it is exactly reproducible everywhere.
 */
export function mulberry32(seed: number): Random {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export function pick<T>(random: Random, items: readonly T[]): T {
  return items[Math.floor(random() * items.length)];
}

// Onsets end in a consonant and endings start with a vowel, so any join reads as one word.
const GENUS_ONSETS = [
  "Vess", "Thal", "Brev", "Cal", "Dorn", "Eph", "Gald", "Hal", "Ix", "Lorm", "Mard", "Nod", "Obr", "Pel", "Rhyn",
  "Sarg", "Torv", "Ulm", "Xen", "Zel", "Cryph", "Quel", "Prist", "Skel", "Wend", "Frax", "Glym", "Kor", "Tresk",
  "Bald", "Hynd", "Strom", "Yrr", "Clav", "Murd", "Phrax",
] as const;
const GENUS_MIDDLES = ["", "", "ar", "en", "il", "or", "ux", "ast", "erm", "ol", "im", "and", "ov", "ent", "ib"] as const;
const GENUS_ENDINGS = [
  "ella", "ina", "ites", "ops", "odon", "oceras", "aster", "ia", "ulus", "ora", "onia", "ax", "is", "aria", "opsis",
  "omya", "ispira", "otrema", "ocaris", "elix",
] as const;

const EPITHET_ROOTS = ["vessir", "thalor", "brun", "quell", "ombr", "saxe", "feld", "cirr", "glaum", "wendr", "ixot", "polt", "morv", "kest"] as const;
const EPITHET_ENDINGS = ["ensis", "ata", "osa", "ica", "ina", "alis", "ella", "ii", "ana", "oides"] as const;

/** A generic name such as "Vessarella": onset, optional middle, ending. */
export function genusName(random: Random): string {
  return pick(random, GENUS_ONSETS) + pick(random, GENUS_MIDDLES) + pick(random, GENUS_ENDINGS);
}

/** A specific epithet such as "thalorensis". */
export function epithet(random: Random): string {
  return pick(random, EPITHET_ROOTS) + pick(random, EPITHET_ENDINGS);
}

/**
 * `count` distinct names from `make`, never one already in `taken` (which is extended). Throws rather
 * than loop for ever when the syllables run out.
 */
export function uniqueNames(random: Random, count: number, make: (random: Random) => string, taken: Set<string> = new Set()): string[] {
  const names: string[] = [];
  let attempts = 0;
  while (names.length < count) {
    if (++attempts > count * 50) throw new Error(`Could only make ${names.length} of ${count} distinct invented names`);
    const name = make(random);
    if (taken.has(name)) continue;
    taken.add(name);
    names.push(name);
  }
  return names;
}
