/** A source of uniform numbers in [0, 1). */
export type UniformSource = () => number;

/** Largest seed: seeds are unsigned 32-bit integers, stored with the layout and shown to the researcher. */
export const MAX_SEED = 0xffff_ffff;

/** Throws unless the seed is an integer in 0 … 4 294 967 295. */
export function assertSeed(seed: number): void {
  if (!Number.isInteger(seed) || seed < 0 || seed > MAX_SEED) {
    throw new RangeError(`A randomization seed is a whole number from 0 to ${MAX_SEED} (got ${seed}).`);
  }
}

/**
 * Mulberry32, a 32-bit-state generator: state += 0x6D2B79F5; z = (state ^ state>>>15)·(state|1);
 * z ^= z + (z ^ z>>>7)·(z|61); output (z ^ z>>>14) / 2³².
 * Source: Tommy Ettinger, "Mulberry32" (2017, public domain), reference C code published as a GitHub gist;
 * passes gjrand per its author. Ample for field layouts (tens of draws), not for cryptography.
 */
export function mulberry32(seed: number): UniformSource {
  assertSeed(seed);
  let state = seed | 0;
  return () => {
    state = (state + 0x6d2b79f5) | 0;
    let z = Math.imul(state ^ (state >>> 15), state | 1);
    z ^= z + Math.imul(z ^ (z >>> 7), z | 61);
    return ((z ^ (z >>> 14)) >>> 0) / 4_294_967_296;
  };
}

/** Uniform integer in 0 … n − 1 from a uniform source (bias below 2⁻³²·n, negligible for plot counts). */
export function randomIndex(random: UniformSource, n: number): number {
  return Math.floor(random() * n);
}

/**
 * A shuffled copy: Fisher–Yates as given by Durstenfeld 1964 (Comm. ACM 7:420, Algorithm 235);
 * Knuth, TAOCP Vol. 2, §3.4.2, Algorithm P. For i = n−1 … 1 swap item i with a uniform j in 0 … i.
 */
export function shuffled<T>(items: readonly T[], random: UniformSource): T[] {
  const out = [...items];
  for (let i = out.length - 1; i > 0; i--) {
    const j = randomIndex(random, i + 1);
    [out[i], out[j]] = [out[j], out[i]];
  }
  return out;
}

/** A fresh seed for a new randomization (the only impure function here; store the result with the layout). */
export function drawSeed(): number {
  return globalThis.crypto.getRandomValues(new Uint32Array(1))[0];
}
