/**
 * Which measured rings belong to which reflections of a standard. The radii
 * are matched, not the d-spacings, since the camera length is what is sought:
 * each pairing of one of the strongest measured rings with one of the
 * standard's strong rings proposes Lp = R / tan(2 theta); the proposal under
 * which most rings (then the most predicted intensity) fall within
 * `toleranceRelative` of a predicted radius wins. With a nominal camera
 * length, proposals further than `nominalWindow` from it are not considered.
 */
import type { PredictedRing } from '../crystal/predicted-ring';
import { formatHkl } from '../crystal/hkl';

export interface RadiusToAssign {
  radiusPx: number;
  radiusSigmaPx: number;
  snr: number;
}

export interface StandardAssignment {
  /** Index into the measured rings -> index into the standard's predicted rings, or -1. */
  ringToStandard: number[];
  /** The Lp of the winning proposal (a starting value; the fit refines it). */
  proposedCameraLengthPx: number;
  matchedCount: number;
}

export interface AssignmentOptions {
  nominalCameraLengthPx?: number;
  /** Largest relative departure from the nominal camera length considered; default 0.15. */
  nominalWindow?: number;
  /** Relative radius window for a match; default 0.002 (well outside film strain, well inside ring spacing). */
  toleranceRelative?: number;
  /** Standard rings weaker than this (relativeIntensity) are not used to propose; default 5. */
  minProposalIntensity?: number;
}

export function ringLabel(ring: PredictedRing): string {
  return ring.families.map((f) => formatHkl(f.hkl)).join(' + ');
}

/** @returns null when no proposal matches at least two rings */
export function assignStandardRings(
  measured: readonly RadiusToAssign[],
  standard: readonly PredictedRing[],
  wavelengthA: number,
  options: AssignmentOptions = {},
): StandardAssignment | null {
  const window = options.nominalWindow ?? 0.15;
  const tol = options.toleranceRelative ?? 0.002;
  const minI = options.minProposalIntensity ?? 5;
  const t = standard.map((r) => Math.tan(2 * Math.asin(wavelengthA / (2 * r.dA))));
  const strongest = measured.map((_, i) => i).sort((a, b) => measured[b]!.snr - measured[a]!.snr).slice(0, 4);
  const proposers = standard.map((_, k) => k).filter((k) => standard[k]!.relativeIntensity >= minI).slice(0, 10);
  let best: { lp: number; map: number[]; count: number; intensity: number; nominalGap: number } | null = null;
  for (const i of strongest) {
    for (const k of proposers) {
      const lp = measured[i]!.radiusPx / t[k]!;
      const nominalGap = options.nominalCameraLengthPx ? Math.abs(lp / options.nominalCameraLengthPx - 1) : 0;
      if (nominalGap > window) continue;
      const map = measured.map((m) => {
        let hit = -1;
        let gap = Infinity;
        t.forEach((tk, kk) => {
          const g = Math.abs(m.radiusPx / (lp * tk) - 1);
          if (g < gap) {
            gap = g;
            hit = kk;
          }
        });
        return gap <= tol + 3 * (m.radiusSigmaPx / m.radiusPx) ? hit : -1;
      });
      // One measured ring per standard ring: keep the closest if two claim the same.
      const claimed = new Map<number, number>();
      map.forEach((k2, i2) => {
        if (k2 < 0) return;
        const other = claimed.get(k2);
        const gapOf = (j: number) => Math.abs(measured[j]!.radiusPx / (lp * t[k2]!) - 1);
        if (other === undefined || gapOf(i2) < gapOf(other)) {
          if (other !== undefined) map[other] = -1;
          claimed.set(k2, i2);
        } else map[i2] = -1;
      });
      const count = map.filter((k2) => k2 >= 0).length;
      const intensity = map.reduce((s, k2) => s + (k2 >= 0 ? standard[k2]!.relativeIntensity : 0), 0);
      const better =
        !best ||
        count > best.count ||
        (count === best.count && intensity > best.intensity + 1e-9) ||
        (count === best.count && Math.abs(intensity - best.intensity) <= 1e-9 && nominalGap < best.nominalGap);
      if (better) best = { lp, map, count, intensity, nominalGap };
    }
  }
  if (!best || best.count < 2) return null;
  return { ringToStandard: best.map, proposedCameraLengthPx: best.lp, matchedCount: best.count };
}
