/**
 * How a ring looks along its circumference, from its azimuthal texture (one band
 * of azimuthal-texture.ts): continuity, spottiness and texture amplitude.
 *
 * Per azimuth cell i of the ring's band: the net intensity y_i = mean_i - B_i
 * (B_i the background under the cell) and its counting-noise standard
 * deviation sigma_i = sqrt(variance(mean_i) / area_i) from the pixel noise
 * model (profile-noise-model.ts); and the texture factor t_i = y_i / E_i, E_i
 * the net a uniform ring would give that cell (see RingCells.expectedNet), so
 * that t = 1 all round for a uniform ring whatever radii each cell's pixels
 * sample. Only cells with at least `minCellCoverage` (default
 * 0.5) of a whole cell's area unmasked and inside the image count; their share
 * of the circle is `visibleFraction`.
 *
 * - continuity: the fraction of counted cells with y_i > k sigma_i, k =
 *   continuitySigma (default 3). A smooth ring strong enough to be seen in every
 *   cell gives 1; a weak ring gives less even if smooth, because a cell is
 *   judged on its own counts.
 * - textureAmplitude: t is fitted by least squares, each cell weighted by its
 *   area, with c0 + a1 cos phi + b1 sin phi + a2 cos 2 phi + b2 sin 2 phi;
 *   the amplitude of the two-fold term relative to the mean,
 *   sqrt(max(0, a2^2 + b2^2 - var(a2) - var(b2))) / c0 (the noise part of
 *   a2^2 + b2^2 subtracted, so a uniform ring gives about 0), and its phase:
 *   t ~ c0 [1 + A cos 2 (phi - phi0)], phi0 = textureAngleDeg in [0, 180). The
 *   one-fold terms are there to keep a slightly wrong centre or a tilt out of
 *   the spottiness; they are not reported. Needs visibleFraction >= 0.5.
 * - spottiness: the relative r.m.s. of the cells about that fit beyond counting
 *   noise, sqrt(X) / c0 with X = (sum e_i^2 n / (n - p) - sum (sigma_i / E_i)^2) / n
 *   (e_i the residuals of t, p the fitted terms); reported only when X exceeds
 *   `spottinessSigma` (default 2) standard deviations of its pure-noise
 *   spread, sqrt(2 sum (sigma_i / E_i)^4) / n, and 0 otherwise. 0 for a smooth ring;
 *   grows with coarse grains (a ring of few spots). It depends on the cell size:
 *   compare rings measured with the same azimuthBinCount.
 */

import { invertSymmetric } from '../fitting';
import { noiseVarianceAt, type ProfileNoiseModel } from './profile-noise-model';

export interface RingCells {
  /** Azimuth of each cell's centre, radians. */
  azimuthRad: ArrayLike<number>;
  /** Mean pixel value per cell (NaN for empty cells). */
  mean: ArrayLike<number>;
  /** Unmasked area per cell, px. */
  area: ArrayLike<number>;
  /** Area of a whole cell, px. */
  fullCellAreaPx: number;
  /** Background under each cell (mean pixel value), or one value for all cells. */
  background: ArrayLike<number> | number;
  /**
   * Net intensity a uniform ring would give each cell: the azimuthally averaged
   * net profile averaged over the cell's own pixels (azimuthal-texture.ts
   * references). Without it every cell is expected to hold the ring's mean,
   * and the radii a cell's pixels happen to sample across a sharp ring count
   * as texture and spottiness.
   */
  expectedNet?: ArrayLike<number>;
}

export interface RingQualityOptions {
  /** Significance a cell needs to count as showing the ring (default 3). */
  continuitySigma?: number;
  /** Fraction of a whole cell's area a cell needs to be counted (default 0.5). */
  minCellCoverage?: number;
  /** Significance of the excess scatter for a non-zero spottiness (default 2). */
  spottinessSigma?: number;
}

export interface RingQuality {
  continuity: number;
  spottiness: number;
  textureAmplitude: number;
  /** Azimuth of the texture maximum, degrees in [0, 180); NaN when not measured. */
  textureAngleDeg: number;
  /** Share of the circle in counted cells. */
  visibleFraction: number;
  cellsUsed: number;
  /** Why a figure is NaN, or null. */
  reason: string | null;
}

/**
 * Quality figures of one ring.
 * @param cells the ring's band from integrateAzimuthalTexture, with its background (not mutated)
 * @param noise pixel noise model (counting noise)
 */
export function ringQuality(cells: RingCells, noise: ProfileNoiseModel, options: RingQualityOptions = {}): RingQuality {
  const kCont = options.continuitySigma ?? 3;
  const coverage = options.minCellCoverage ?? 0.5;
  const kSpot = options.spottinessSigma ?? 2;
  const m = cells.mean.length;
  const bgArray = typeof cells.background === 'number' ? null : cells.background;
  if (cells.area.length !== m || cells.azimuthRad.length !== m || (bgArray && bgArray.length !== m) || (cells.expectedNet && cells.expectedNet.length !== m)) {
    throw new RangeError(`cells.mean, area, azimuthRad, background and expectedNet must have the same length; got ${m}, ${cells.area.length}, ${cells.azimuthRad.length}, ${bgArray?.length ?? m}, ${cells.expectedNet?.length ?? m}`);
  }
  if (typeof cells.background === 'number' && !Number.isFinite(cells.background)) throw new RangeError(`cells.background must be finite; got ${cells.background}`);

  const phi: number[] = [];
  const y: number[] = [];
  const s2: number[] = [];
  const areas: number[] = [];
  const expected: number[] = [];
  for (let i = 0; i < m; i++) {
    const a = cells.area[i]!;
    const mu = cells.mean[i]!;
    const bg = bgArray ? bgArray[i]! : (cells.background as number);
    const e = cells.expectedNet ? cells.expectedNet[i]! : 1;
    if (!(a >= coverage * cells.fullCellAreaPx) || !Number.isFinite(mu) || !Number.isFinite(bg) || !Number.isFinite(e)) continue;
    phi.push(cells.azimuthRad[i]!);
    y.push(mu - bg);
    s2.push(noiseVarianceAt(noise, mu) / a);
    areas.push(a);
    expected.push(e);
  }
  const n = y.length;
  const visibleFraction = m > 0 ? n / m : 0;
  const nan: RingQuality = {
    continuity: Number.NaN,
    spottiness: Number.NaN,
    textureAmplitude: Number.NaN,
    textureAngleDeg: Number.NaN,
    visibleFraction,
    cellsUsed: n,
    reason: null,
  };
  if (n < 8) return { ...nan, reason: `only ${n} azimuth cells of the ring are visible (8 needed)` };

  let seen = 0;
  for (let i = 0; i < n; i++) if (y[i]! > kCont * Math.sqrt(s2[i]!)) seen++;
  const continuity = seen / n;

  // Texture factor of each cell: its net over what a uniform ring would give it (or the net itself).
  const tPhi: number[] = [];
  const t: number[] = [];
  const tVar: number[] = [];
  const tArea: number[] = [];
  for (let i = 0; i < n; i++) {
    if (!(expected[i]! > 0)) continue;
    tPhi.push(phi[i]!);
    t.push(y[i]! / expected[i]!);
    tVar.push(s2[i]! / (expected[i]! * expected[i]!));
    tArea.push(areas[i]!);
  }
  const nt = t.length;
  // Harmonic fit: constant, and the 1- and 2-fold terms when enough of the circle is seen.
  const harmonics = visibleFraction >= 0.5 ? 5 : 1;
  const fit = nt > harmonics + 2 ? harmonicFit(tPhi, t, tVar, tArea, harmonics) : null;
  if (fit === null || !(fit.coefficients[0]! > 0)) {
    return { ...nan, continuity, reason: 'the ring has no positive mean intensity along its circumference' };
  }
  const c0 = fit.coefficients[0]!;
  let rss = 0;
  let noiseSum = 0;
  let noise4 = 0;
  for (let i = 0; i < nt; i++) {
    const e = t[i]! - fit.evaluate(tPhi[i]!);
    rss += e * e;
    noiseSum += tVar[i]!;
    noise4 += tVar[i]! * tVar[i]!;
  }
  const excess = (rss * (nt / (nt - harmonics)) - noiseSum) / nt;
  const excessSpread = Math.sqrt(2 * noise4) / nt;
  const spottiness = excess > kSpot * excessSpread ? Math.sqrt(excess) / c0 : 0;

  let textureAmplitude = Number.NaN;
  let textureAngleDeg = Number.NaN;
  let reason: string | null = null;
  if (harmonics === 5) {
    const a2 = fit.coefficients[3]!;
    const b2 = fit.coefficients[4]!;
    const debiased = a2 * a2 + b2 * b2 - fit.variance[3]! - fit.variance[4]!;
    textureAmplitude = Math.sqrt(Math.max(0, debiased)) / c0;
    let ang = (0.5 * Math.atan2(b2, a2) * 180) / Math.PI;
    if (ang < 0) ang += 180;
    textureAngleDeg = ang >= 180 ? ang - 180 : ang;
  } else {
    reason = `texture not measured: only ${(100 * visibleFraction).toFixed(0)} % of the ring is visible (50 % needed)`;
  }
  return { continuity, spottiness, textureAmplitude, textureAngleDeg, visibleFraction, cellsUsed: n, reason };
}

interface HarmonicFit {
  coefficients: Float64Array;
  /** Variance of each coefficient from the counting noise of the cells. */
  variance: Float64Array;
  evaluate(phi: number): number;
}

/**
 * Least squares of y on [1, cos, sin, cos 2, sin 2] (first `terms`), each cell
 * weighted by its area, so that every pixel counts alike and the weights do not
 * depend on the intensity (weights 1/sigma^2 would pull the fit toward the
 * fainter cells of a textured or spotty ring). Coefficient variances by the
 * sandwich (A^T W A)^-1 A^T W S W A (A^T W A)^-1, S = diag(sigma_i^2). null if singular.
 */
function harmonicFit(phi: number[], y: number[], s2: number[], area: number[], terms: number): HarmonicFit | null {
  const basis = (p: number, out: Float64Array) => {
    out[0] = 1;
    if (terms > 1) {
      out[1] = Math.cos(p);
      out[2] = Math.sin(p);
      out[3] = Math.cos(2 * p);
      out[4] = Math.sin(2 * p);
    }
  };
  const ata = new Float64Array(terms * terms);
  const atb = new Float64Array(terms);
  const meat = new Float64Array(terms * terms);
  const row = new Float64Array(5);
  for (let i = 0; i < y.length; i++) {
    basis(phi[i]!, row);
    const w = area[i]!;
    for (let a = 0; a < terms; a++) {
      atb[a] += w * row[a]! * y[i]!;
      for (let b = 0; b < terms; b++) {
        ata[a * terms + b] += w * row[a]! * row[b]!;
        meat[a * terms + b] += w * w * s2[i]! * row[a]! * row[b]!;
      }
    }
  }
  const inv = invertSymmetric(ata, terms);
  if (inv === null) return null;
  const coefficients = new Float64Array(terms);
  const variance = new Float64Array(terms);
  for (let a = 0; a < terms; a++) {
    for (let b = 0; b < terms; b++) coefficients[a] += inv[a * terms + b]! * atb[b]!;
    let v = 0;
    for (let b = 0; b < terms; b++) for (let c = 0; c < terms; c++) v += inv[a * terms + b]! * meat[b * terms + c]! * inv[c * terms + a]!;
    variance[a] = v;
  }
  return {
    coefficients,
    variance,
    evaluate(p) {
      basis(p, row);
      let v = 0;
      for (let a = 0; a < terms; a++) v += coefficients[a]! * row[a]!;
      return v;
    },
  };
}
