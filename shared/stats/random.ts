// Seeded pseudo-random numbers for Monte Carlo p-values, so that a reported seed reproduces a result
// exactly in the browser, on the server and in a worker.

/** A source of uniform numbers in [0, 1) with 53 random bits. */
export type UniformSource = () => number;

/**
 * xoshiro128** (Blackman & Vigna 2018), seeded through the SplitMix32 mixing function so that
 * neighbouring seeds give unrelated streams. Any integer seed is accepted (taken modulo 2^32).
 */
export function createUniformSource(seed: number): UniformSource {
  if (!Number.isInteger(seed)) throw new Error(`createUniformSource: seed is ${seed}; it must be an integer`);
  let mixer = seed >>> 0;
  const splitMix = (): number => {
    mixer = (mixer + 0x9e3779b9) | 0;
    let z = mixer;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b);
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35);
    return (z ^ (z >>> 16)) >>> 0;
  };
  let s0 = splitMix();
  let s1 = splitMix();
  let s2 = splitMix();
  let s3 = splitMix();
  if ((s0 | s1 | s2 | s3) === 0) s0 = 1; // the all-zero state is a fixed point
  const next32 = (): number => {
    const product = Math.imul(s1, 5);
    const result = Math.imul((product << 7) | (product >>> 25), 9) >>> 0;
    const t = s1 << 9;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 ^= t;
    s3 = (s3 << 11) | (s3 >>> 21);
    return result;
  };
  return () => ((next32() >>> 5) * 67108864 + (next32() >>> 6)) / 9007199254740992;
}
