/**
 * Weighted least squares for the one-parameter model every isotropic cell
 * refinement here reduces to:
 *
 *   Q_j = c_j x,   Q_j = 1 / d_j^2
 *
 * cubic cell: c_j = N_j = h^2 + k^2 + l^2 and x = 1 / a^2; a library phase
 * scaled isotropically by s: c_j = 1 / d_ref,j^2 and x = 1 / s^2.
 *
 * Weights w_j = 1 / sigma_Q,j^2 with sigma_Q = 2 sigma_d / d^3 (first-order
 * propagation of sigma_d through Q = d^-2; GUM, JCGM 100:2008, eq. 10).
 *
 *   x       = sum(w c Q) / sum(w c^2)
 *   sigma_x = 1 / sqrt(sum(w c^2))                         (propagated)
 *   chi2    = sum(w (Q - c x)^2),   nu = n - 1
 *   sigma_x' = sigma_x sqrt(chi2 / nu)                     (scaled, nu >= 1)
 *
 * The reported uncertainty is the larger of the two: when the scatter about
 * the fit exceeds what the stated sigmas explain (chi2/nu > 1), the scatter
 * rules; when the stated sigmas are pessimistic (chi2/nu < 1), they are kept
 * rather than shrunk. This is common practice in powder-pattern cell
 * refinement. (A one-parameter fit through the origin needs no centring or
 * rank check: it is singular only when every c_j is zero.)
 */

export interface ProportionalQPoint {
  qPerA2: number;
  qSigmaPerA2: number;
  coefficient: number;
}

export type SigmaSource = 'propagated' | 'scaled by reduced chi-square';

export interface ProportionalQFit {
  x: number;
  /** Standard uncertainty of x: max(propagated, scaled). */
  xSigma: number;
  xSigmaPropagated: number;
  /** Propagated sigma times sqrt(chi2 / nu); null with a single point. */
  xSigmaScaled: number | null;
  sigmaSource: SigmaSource;
  chiSquare: number;
  degreesOfFreedom: number;
  /** chi2 / nu, or null with a single point. */
  reducedChiSquare: number | null;
}

/** Q = 1/d^2 and its propagated standard uncertainty 2 sigma_d / d^3. */
export function qFromD(dA: number, dSigmaA: number): { qPerA2: number; qSigmaPerA2: number } {
  return { qPerA2: 1 / (dA * dA), qSigmaPerA2: (2 * dSigmaA) / (dA * dA * dA) };
}

/**
 * Fits Q_j = c_j x by weighted least squares.
 * @throws RangeError for an empty list, a non-positive sigma or all-zero coefficients
 */
export function fitProportionalQ(points: readonly ProportionalQPoint[]): ProportionalQFit {
  if (points.length === 0) throw new RangeError('points must hold at least one (Q, sigma_Q, c) triple; got none');
  let swcc = 0;
  let swcq = 0;
  points.forEach((p, i) => {
    if (!(p.qSigmaPerA2 > 0) || !Number.isFinite(p.qSigmaPerA2)) {
      throw new RangeError(`points[${i}].qSigmaPerA2 must be positive and finite; got ${p.qSigmaPerA2}`);
    }
    const w = 1 / (p.qSigmaPerA2 * p.qSigmaPerA2);
    swcc += w * p.coefficient * p.coefficient;
    swcq += w * p.coefficient * p.qPerA2;
  });
  if (!(swcc > 0)) throw new RangeError('points: every coefficient is zero, so x is undetermined');
  const x = swcq / swcc;
  const xSigmaPropagated = 1 / Math.sqrt(swcc);
  let chiSquare = 0;
  for (const p of points) chiSquare += ((p.qPerA2 - p.coefficient * x) / p.qSigmaPerA2) ** 2;
  const degreesOfFreedom = points.length - 1;
  const reducedChiSquare = degreesOfFreedom > 0 ? chiSquare / degreesOfFreedom : null;
  const xSigmaScaled = reducedChiSquare === null ? null : xSigmaPropagated * Math.sqrt(reducedChiSquare);
  const scaledWins = xSigmaScaled !== null && xSigmaScaled > xSigmaPropagated;
  return {
    x,
    xSigma: scaledWins ? xSigmaScaled : xSigmaPropagated,
    xSigmaPropagated,
    xSigmaScaled,
    sigmaSource: scaledWins ? 'scaled by reduced chi-square' : 'propagated',
    chiSquare,
    degreesOfFreedom,
    reducedChiSquare,
  };
}

/**
 * A length L from x = 1 / L^2 with its first-order uncertainty:
 *   L = x^(-1/2),   sigma_L = L sigma_x / (2 x).
 */
export function lengthFromInverseSquare(x: number, xSigma: number): { lengthA: number; lengthSigmaA: number } {
  if (!(x > 0)) throw new RangeError(`x = 1/L^2 must be positive; got ${x}`);
  const lengthA = 1 / Math.sqrt(x);
  return { lengthA, lengthSigmaA: (lengthA * xSigma) / (2 * x) };
}
