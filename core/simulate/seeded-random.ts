/**
 * The simulator's seeded random numbers: uniform deviates from Mulberry32 and
 * standard normal deviates from them, plus a way to derive independent streams
 * from one seed, so each part of a pattern (the grains of one ring, the hot pixels,
 * the detector noise) draws from its own stream. Adding a part to a simulation then
 * leaves the random draws of every other part unchanged.
 *
 * Mulberry32 (T. Ettinger, 2017, public domain; from memory) has a 32-bit state and
 * period 2^32; it passes the usual empirical batteries well enough for simulated
 * images, and is not for cryptography. Uniform deviates are multiples of 2^-32 in [0, 1).
 */

/** A seeded source of random numbers. Not shared between streams: derive one per use. */
export interface RandomStream {
  /** Uniform deviate in [0, 1), a multiple of 2^-32. */
  uniform(): number;
  /** Standard normal deviate (mean 0, variance 1). */
  normal(): number;
}

/** Throws a RangeError unless `seed` is an integer in [0, 2^32). */
export function checkSeed(seed: number, label = 'seed'): void {
  if (!Number.isInteger(seed) || seed < 0 || seed > 0xffffffff) {
    throw new RangeError(`${label} must be an integer from 0 to 4294967295; got ${seed}`);
  }
}

/**
 * 32-bit integer hash ("lowbias32": C. Wellons, "Prospecting for hash functions", 2018,
 * from memory): every input bit affects every output bit, so neighbouring seeds give
 * unrelated streams.
 */
function hash32(x: number): number {
  let h = x >>> 0;
  h ^= h >>> 16;
  h = Math.imul(h, 0x7feb352d);
  h ^= h >>> 15;
  h = Math.imul(h, 0x846ca68b);
  h ^= h >>> 16;
  return h >>> 0;
}

/**
 * The seed of the stream named by `labels` (small non-negative integers) under `seed`:
 * hash(... hash(hash(seed) + label1) + label2 ...). Same inputs, same stream.
 */
export function deriveSeed(seed: number, ...labels: number[]): number {
  let h = hash32(seed);
  for (const label of labels) h = hash32((h + Math.imul(label + 1, 0x9e3779b9)) >>> 0);
  return h;
}

/**
 * A stream seeded with `seed` (an integer in [0, 2^32)).
 *
 * normal() uses the polar form of the Box-Muller transform (G. Marsaglia and T. A. Bray,
 * SIAM Review 6 (1964) 260): draw (v1, v2) uniform in the square [-1, 1)^2 until
 * 0 < s = v1^2 + v2^2 < 1, then z0 = v1 sqrt(-2 ln s / s) and z1 = v2 sqrt(-2 ln s / s)
 * are independent standard normal deviates; both are used, in turn. (No sine or cosine,
 * and a 1 - pi/4 = 21 % rejection rate.)
 * @throws RangeError for a seed that is not such an integer
 */
export function randomStream(seed: number): RandomStream {
  checkSeed(seed);
  // Mulberry32 on an int32 state (the same bits as the usual uint32 form, and faster in V8).
  let a = seed | 0;
  const uniform = (): number => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), a | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  let spare = 0;
  let hasSpare = false;
  const normal = (): number => {
    if (hasSpare) {
      hasSpare = false;
      return spare;
    }
    let v1: number;
    let v2: number;
    let s: number;
    do {
      v1 = 2 * uniform() - 1;
      v2 = 2 * uniform() - 1;
      s = v1 * v1 + v2 * v2;
    } while (s >= 1 || s === 0);
    const factor = Math.sqrt((-2 * Math.log(s)) / s);
    spare = v2 * factor;
    hasSpare = true;
    return v1 * factor;
  };
  return { uniform, normal };
}
