/**
 * Measured rings in the form the matchers work with: Q = 1/d^2, its
 * propagated sigma, and the sigma raised to the acceptance-window floor.
 *
 *   sigma_Q     = 2 sigma_d / d^3                 (first-order propagation)
 *   sigma_Q,eff = max(sigma_Q, 2 f Q / k)        (window k sigma_Q,eff >= f relative in d)
 */

import type { MeasuredRing } from './measured-ring';
import { qFromD } from './proportional-q-fit';

export interface PreparedRing {
  /** Position in the caller's array. */
  index: number;
  dA: number;
  dSigmaA: number;
  intensity?: number;
  qPerA2: number;
  /** Measured sigma_Q: the fit weights. */
  qSigmaPerA2: number;
  /** sigma_Q raised to the window floor: windows and scores. */
  qSigmaEffPerA2: number;
}

/**
 * @param windowSigmas k, the window half-width in sigmas
 * @param windowFloorRelative f, the smallest window half-width, relative in d
 */
export function prepareRings(rings: readonly MeasuredRing[], windowSigmas: number, windowFloorRelative: number): PreparedRing[] {
  return rings.map((r, index) => {
    const { qPerA2, qSigmaPerA2 } = qFromD(r.dA, r.dSigmaA);
    return {
      index,
      dA: r.dA,
      dSigmaA: r.dSigmaA,
      ...(r.intensity !== undefined ? { intensity: r.intensity } : {}),
      qPerA2,
      qSigmaPerA2,
      qSigmaEffPerA2: Math.max(qSigmaPerA2, (2 * windowFloorRelative * qPerA2) / windowSigmas),
    };
  });
}

/** The measured Q range widened by each end's window: [Q_low, Q_high]. */
export function measuredQRange(rings: readonly PreparedRing[], windowSigmas: number): { qLowPerA2: number; qHighPerA2: number } {
  let lo = rings[0]!;
  let hi = rings[0]!;
  for (const r of rings) {
    if (r.qPerA2 < lo.qPerA2) lo = r;
    if (r.qPerA2 > hi.qPerA2) hi = r;
  }
  return {
    qLowPerA2: lo.qPerA2 - windowSigmas * lo.qSigmaEffPerA2,
    qHighPerA2: hi.qPerA2 + windowSigmas * hi.qSigmaEffPerA2,
  };
}

/** "4.0782(8)": a value with its standard uncertainty in the last digit shown (3 to 6 decimals). */
export function formatWithUncertainty(value: number, sigma: number): string {
  const decimals = Math.min(6, Math.max(3, -Math.floor(Math.log10(Math.max(sigma, 1e-9)))));
  return `${value.toFixed(decimals)}(${Math.round(sigma * 10 ** decimals)})`;
}
