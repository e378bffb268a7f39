/**
 * The camera length (over pixel pitch) from rings of known spacing, in the
 * exact flat-detector geometry. Each ring of a standard with reference
 * spacing d_i and measured corrected radius R_i +- sigma_i obeys
 *
 *   R_i = Lp t_i,   t_i = tan(2 asin(lambda / 2 d_i)),
 *
 * so the weighted least-squares estimate is linear in Lp:
 *
 *   Lp = sum(R_i t_i / sigma_i^2) / sum(t_i^2 / sigma_i^2),
 *   sigma_Lp = 1 / sqrt(sum(t_i^2 / sigma_i^2)),
 *
 * (the straight line through the origin; e.g. P. R. Bevington and D. K. Robinson,
 * Data Reduction and Error Analysis, 3rd ed., ch. 6, from memory). When the
 * reduced chi-square exceeds 1 the ring radii scatter more than their fits
 * say (film strain, texture, a poor ring): sigma_Lp is then scaled by
 * sqrt(chi^2 / (n - 1)) (the Birge ratio), never narrowed below the
 * propagated value.
 *
 * Outliers: a ring is rejected when its standardised residual
 * z_i = (R_i - Lp t_i) / sigma_i exceeds max(4, 4 x 1.4826 MAD(z)) in size
 * (MAD: median absolute deviation about the median, 1.4826 MAD estimating a
 * standard deviation for normal errors: common practice); the worst one is
 * dropped and the fit repeated, while at least 3 rings remain.
 */

import type { Hkl } from '../crystal/hkl';

export interface StandardRing {
  /** Indices of the ring's (first) reflection family. */
  hkl: Hkl;
  radiusPx: number;
  radiusSigmaPx: number;
  /** Reference spacing of the standard's reflection(s) on this ring, Å. */
  dRefA: number;
  /** Label for reports ("1 1 1", or "3 3 3 + 5 1 1"). */
  label: string;
  /** Which image the ring came from (0 for a single image). */
  imageIndex: number;
}

export interface RingResidual {
  hkl: Hkl;
  label: string;
  imageIndex: number;
  radiusPx: number;
  dRefA: number;
  /** d from the fitted camera, Å. */
  dFitA: number;
  /** (d_fit - d_ref) / d_ref, ppm. */
  residualPpm: number;
  /** (R - Lp t) / sigma. */
  standardisedResidual: number;
  rejected: boolean;
}

export type CameraLengthFit =
  | {
      ok: true;
      cameraLengthPx: number;
      /** Standard uncertainty (propagated, widened by the Birge ratio when chi^2/(n-1) > 1). */
      cameraLengthSigmaPx: number;
      /** The propagated value alone. */
      cameraLengthSigmaPropagatedPx: number;
      reducedChiSquare: number;
      usedCount: number;
      residuals: RingResidual[];
    }
  | { ok: false; reason: string; residuals: RingResidual[] };

export const MIN_CALIBRATION_RINGS = 3;

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

/**
 * Fits Lp to the rings of a standard.
 * @param rings rings assigned to reference spacings; not mutated
 * @param wavelengthA electron wavelength, Å
 */
export function fitCameraLength(rings: readonly StandardRing[], wavelengthA: number): CameraLengthFit {
  if (!(wavelengthA > 0)) throw new RangeError(`wavelengthA must be positive; got ${wavelengthA}`);
  rings.forEach((r, i) => {
    if (!(r.radiusPx > 0) || !(r.radiusSigmaPx > 0) || !(r.dRefA > 0)) {
      throw new RangeError(`rings[${i}] needs radiusPx > 0, radiusSigmaPx > 0 and dRefA > 0; got ${r.radiusPx}, ${r.radiusSigmaPx}, ${r.dRefA}`);
    }
  });
  const t = rings.map((r) => Math.tan(2 * Math.asin(wavelengthA / (2 * r.dRefA))));
  const used = rings.map(() => true);
  const residualsFor = (lp: number, z: number[]): RingResidual[] =>
    rings.map((r, i) => {
      const dFitA = wavelengthA / (2 * Math.sin(Math.atan2(r.radiusPx, lp) / 2));
      return {
        hkl: r.hkl,
        label: r.label,
        imageIndex: r.imageIndex,
        radiusPx: r.radiusPx,
        dRefA: r.dRefA,
        dFitA,
        residualPpm: (dFitA / r.dRefA - 1) * 1e6,
        standardisedResidual: z[i]!,
        rejected: !used[i],
      };
    });

  for (;;) {
    let sxy = 0;
    let sxx = 0;
    let n = 0;
    rings.forEach((r, i) => {
      if (!used[i]) return;
      const w = 1 / (r.radiusSigmaPx * r.radiusSigmaPx);
      sxy += w * r.radiusPx * t[i]!;
      sxx += w * t[i]! * t[i]!;
      n++;
    });
    if (n < MIN_CALIBRATION_RINGS) {
      const lp = sxx > 0 ? sxy / sxx : Number.NaN;
      return {
        ok: false,
        reason: `only ${n} usable ring${n === 1 ? '' : 's'} of the standard; at least ${MIN_CALIBRATION_RINGS} are needed to calibrate (check the standard phase, the voltage and the nominal camera length)`,
        residuals: residualsFor(lp, rings.map(() => Number.NaN)),
      };
    }
    const lp = sxy / sxx;
    const z = rings.map((r, i) => (r.radiusPx - lp * t[i]!) / r.radiusSigmaPx);
    let chi2 = 0;
    rings.forEach((_, i) => {
      if (used[i]) chi2 += z[i]! * z[i]!;
    });
    const reduced = chi2 / (n - 1);
    const usedZ = z.filter((_, i) => used[i]);
    const mid = median(usedZ);
    const robust = 1.4826 * median(usedZ.map((v) => Math.abs(v - mid)));
    const limit = Math.max(4, 4 * robust);
    let worst = -1;
    rings.forEach((_, i) => {
      if (used[i] && Math.abs(z[i]! - mid) > limit && (worst < 0 || Math.abs(z[i]! - mid) > Math.abs(z[worst]! - mid))) worst = i;
    });
    if (worst >= 0 && n - 1 >= MIN_CALIBRATION_RINGS) {
      used[worst] = false;
      continue;
    }
    const propagated = 1 / Math.sqrt(sxx);
    return {
      ok: true,
      cameraLengthPx: lp,
      cameraLengthSigmaPx: propagated * Math.max(1, Math.sqrt(reduced)),
      cameraLengthSigmaPropagatedPx: propagated,
      reducedChiSquare: reduced,
      usedCount: n,
      residuals: residualsFor(lp, z),
    };
  }
}
