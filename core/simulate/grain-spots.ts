/**
 * Spotty rings of a coarse-grained film: only a few grains diffract into each ring, so
 * its intensity gathers into spots. For a ring of corrected radius R with N grains the
 * azimuthal modulation is
 *
 *   S(phi) = (2 pi / N) sum_i w_i g_i(phi - phi_i),        sum_i w_i = N,
 *
 * with g_i a Gaussian in azimuth of unit area over a turn (wrapped) and angular FWHM
 * spotFwhmPx / R, so every spot is spotFwhmPx wide along the ring whatever its radius.
 * The mean of S over a turn is exactly 1: the ring's azimuthal mean (its radial profile)
 * is the same as for a smooth ring. A spot's radial shape is the ring's line shape.
 *
 * Drawn from a seeded stream: azimuths phi_i uniform in [-pi, pi); raw strengths
 * exponential with mean 1 (grains of random size; a plain choice, common practice for
 * speckle-like intensities), times the texture factor T(phi_i) when the phase is
 * textured (so grains cluster in strength where the texture puts intensity), then
 * scaled to sum to N.
 */

import type { RandomStream } from './seeded-random';
import { textureFactor, type TextureSpec } from './texture-modulation';

export interface GrainSpot {
  /** Corrected azimuth of the spot's centre, degrees from +x toward +y, in [-180, 180). */
  azimuthDeg: number;
  /** w_i: strength relative to the mean spot (the N weights sum to N). */
  weight: number;
}

/**
 * The N spots of one ring, drawn from `random`.
 * @param grainCount N, an integer >= 1
 * @param texture the phase's texture, or null
 */
export function drawGrainSpots(grainCount: number, texture: TextureSpec | null, random: RandomStream): GrainSpot[] {
  if (!Number.isInteger(grainCount) || grainCount < 1) throw new RangeError(`grainCount must be an integer >= 1; got ${grainCount}`);
  const spots: GrainSpot[] = [];
  let sum = 0;
  for (let i = 0; i < grainCount; i++) {
    const azimuthRad = -Math.PI + 2 * Math.PI * random.uniform();
    const weight = -Math.log(1 - random.uniform()) * (texture ? textureFactor(texture, azimuthRad) : 1);
    spots.push({ azimuthDeg: (azimuthRad * 180) / Math.PI, weight });
    sum += weight;
  }
  // A zero sum needs every strength 0: impossible for exponential draws (1 - u > 0), but an
  // 'arcs' or 'cosine' texture of amplitude 1 can null a factor, so guard it.
  const scale = sum > 0 ? grainCount / sum : 1;
  for (const s of spots) s.weight = sum > 0 ? s.weight * scale : 1;
  return spots;
}

/**
 * S(phi) at azimuth `azimuthRad` for spots of angular standard deviation `sigmaRad`
 * (= spotFwhmPx / (R * 2 sqrt(2 ln 2))): each spot's Gaussian summed over the turns
 * within 8 sigma (wrapped), so this is exact to 1e-14 of a spot's peak.
 */
export function grainSpotsFactor(spots: readonly GrainSpot[], sigmaRad: number, azimuthRad: number): number {
  const norm = (2 * Math.PI) / (spots.length * sigmaRad * Math.sqrt(2 * Math.PI));
  const reach = 8 * sigmaRad;
  let total = 0;
  for (const spot of spots) {
    let d = azimuthRad - (spot.azimuthDeg * Math.PI) / 180;
    d -= 2 * Math.PI * Math.floor(d / (2 * Math.PI) + 0.5);
    for (let k = -1; k <= 1; k++) {
      const dk = d + 2 * Math.PI * k;
      if (Math.abs(dk) <= reach) total += spot.weight * Math.exp((-0.5 * dk * dk) / (sigmaRad * sigmaRad));
    }
  }
  return total * norm;
}

/**
 * S(phi) tabulated at the `nodeCount` nodes phi_j = -pi + 2 pi j / n of an azimuth table
 * (azimuth-table.ts): the same sum as grainSpotsFactor, built spot by spot over the nodes
 * within 8 sigma, so the cost is N times the nodes a spot covers, not N times n.
 */
export function grainSpotsNodeValues(spots: readonly GrainSpot[], sigmaRad: number, nodeCount: number): Float64Array {
  const values = new Float64Array(nodeCount);
  const step = (2 * Math.PI) / nodeCount;
  const norm = (2 * Math.PI) / (spots.length * sigmaRad * Math.sqrt(2 * Math.PI));
  const reachNodes = Math.ceil((8 * sigmaRad) / step);
  for (const spot of spots) {
    const centre = (spot.azimuthDeg * Math.PI) / 180;
    const nearest = Math.round((centre + Math.PI) / step);
    for (let m = nearest - reachNodes; m <= nearest + reachNodes; m++) {
      const d = -Math.PI + m * step - centre;
      if (Math.abs(d) > 8 * sigmaRad) continue;
      const j = ((m % nodeCount) + nodeCount) % nodeCount;
      values[j] = values[j]! + spot.weight * norm * Math.exp((-0.5 * d * d) / (sigmaRad * sigmaRad));
    }
  }
  return values;
}
