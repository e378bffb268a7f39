/**
 * From expected electrons to the numbers a camera writes:
 *
 *   n   ~ Poisson(E)                       shot noise of the electron count (poisson-deviate.ts)
 *   a   = offsetAdu + gain * n + sigma_r z   z standard normal: Gaussian read noise
 *   out = min(65535, max(0, round(a)))     for 'uint16' output (round half up);
 *   out = a                                for 'float32' output (no rounding, no clipping).
 *
 * With noise off, n = E and z = 0. Pixels rounded to 65535 are at full scale (saturated);
 * pixels whose value would be negative are clipped to 0.
 */

import { poissonDeviate } from './poisson-deviate';
import type { RandomStream } from './seeded-random';
import { FULL_SCALE_ADU } from './simulation-spec';

export interface DetectorResponse {
  gainAduPerElectron: number;
  offsetAdu: number;
  readNoiseAdu: number;
  noise: boolean;
  output: 'uint16' | 'float32';
}

/**
 * Writes the detector's output for the expected counts `expected` (electrons per pixel)
 * into `out` (same length; may be the same array), drawing noise from `random` pixel by
 * pixel in order. Returns how many pixels were clipped to 0.
 * @param onRows called with the fraction done every 64 rows of `width` pixels
 */
export function applyDetectorResponse(
  expected: Float32Array,
  out: Float32Array,
  response: DetectorResponse,
  random: RandomStream,
  width: number,
  onRows?: (fractionDone: number) => void,
): number {
  const { gainAduPerElectron: gain, offsetAdu: offset, readNoiseAdu: read, noise } = response;
  const quantise = response.output === 'uint16';
  const fullScale = FULL_SCALE_ADU;
  const poisson = poissonDeviate;
  let clippedLow = 0;
  const n = expected.length;
  const block = 64 * width;
  for (let i = 0; i < n; i++) {
    const e = expected[i]!;
    let adu: number;
    if (noise) {
      adu = offset + gain * poisson(e, random);
      if (read > 0) adu += read * random.normal();
    } else {
      adu = offset + gain * e;
    }
    if (quantise) {
      adu = Math.floor(adu + 0.5);
      if (adu < 0) {
        adu = 0;
        clippedLow++;
      } else if (adu > fullScale) {
        adu = fullScale;
      }
    }
    out[i] = adu;
    if (onRows && (i + 1) % block === 0) onRows((i + 1) / n);
  }
  return clippedLow;
}
