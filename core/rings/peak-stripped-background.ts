/**
 * The background of a profile with its fitted rings taken out first: SNIP
 * (background-snip.ts) applied to the profile minus the sum of the fitted
 * pseudo-Voigt peaks, tails and all.
 *
 * SNIP alone keeps in the background whatever part of a ring is wider than its
 * window: the far Lorentzian tails, and between two close rings their
 * overlapping tails, unevenly on the two sides of each ring. A fit of the full
 * pseudo-Voigt on top of that counts those tails twice, and where it is uneven
 * it pulls the centre toward or away from the neighbour. With the fitted rings
 * subtracted, SNIP sees only what the rings leave: the diffuse background,
 * halos, and the fits' small misfit, which it clips where positive. Fitting
 * again on this background and repeating converges in a few rounds
 * (measure-rings.ts does two).
 */

import { snipBackground, type SnipOptions } from './background-snip';
import { pseudoVoigt, type PseudoVoigtPeak } from './pseudo-voigt';

/**
 * @param radiusPx bin centres, px
 * @param values the profile (not mutated); non-finite bins are bridged by SNIP
 * @param peaks fitted rings to take out
 */
export function peakStrippedBackground(radiusPx: ArrayLike<number>, values: ArrayLike<number>, peaks: readonly PseudoVoigtPeak[], snip: SnipOptions): Float64Array {
  if (radiusPx.length !== values.length) throw new RangeError(`radiusPx and values must have the same length; got ${radiusPx.length} and ${values.length}`);
  const residual = Float64Array.from(values);
  for (let k = 0; k < residual.length; k++) {
    if (!Number.isFinite(residual[k]!)) continue;
    for (const p of peaks) residual[k] -= pseudoVoigt(p, radiusPx[k]!);
  }
  return snipBackground(residual, snip);
}
