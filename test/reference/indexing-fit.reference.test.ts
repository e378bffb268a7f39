/**
 * The weighted one-parameter fit Q = c x against scipy.optimize.curve_fit
 * (Debian's python3-scipy): absolute_sigma=True gives the propagated
 * covariance, absolute_sigma=False the one scaled by the reduced chi-square.
 */
import { describe, expect, it } from 'vitest';
import { fitProportionalQ } from '../../core/indexing';
import { gaussian, mulberry32 } from '../support/seeded-random';
import { referenceAvailable, runPythonJson } from './python-reference';

describe.runIf(referenceAvailable('scipy'))('fitProportionalQ against scipy.optimize.curve_fit', () => {
  it('matches x, the propagated sigma and the scaled sigma to 1e-8 relative (seed 20261211)', () => {
    const rand = mulberry32(20261211);
    const a = 4.0786;
    const points = [3, 4, 8, 11, 12, 16, 19, 20].map((n) => {
      const d = (a / Math.sqrt(n)) * (1 + 0.003 * gaussian(rand));
      const sigmaD = 0.002 * d;
      return { qPerA2: 1 / d ** 2, qSigmaPerA2: (2 * sigmaD) / d ** 3, coefficient: n };
    });
    const ref = runPythonJson<{ x: number; sAbs: number; sRel: number }>(
      `
import numpy as np
from scipy.optimize import curve_fit
c = np.array([p["coefficient"] for p in INPUT], float)
q = np.array([p["qPerA2"] for p in INPUT], float)
s = np.array([p["qSigmaPerA2"] for p in INPUT], float)
f = lambda c, x: c * x
pa, ca = curve_fit(f, c, q, p0=[q[0] / c[0]], sigma=s, absolute_sigma=True)
pr, cr = curve_fit(f, c, q, p0=[q[0] / c[0]], sigma=s, absolute_sigma=False)
print(json.dumps({"x": float(pa[0]), "sAbs": float(np.sqrt(ca[0, 0])), "sRel": float(np.sqrt(cr[0, 0]))}))
`,
      points,
    );
    const fit = fitProportionalQ(points);
    expect(Math.abs(fit.x / ref.x - 1)).toBeLessThan(1e-8);
    expect(Math.abs(fit.xSigmaPropagated / ref.sAbs - 1)).toBeLessThan(1e-6);
    expect(Math.abs(fit.xSigmaScaled! / ref.sRel - 1)).toBeLessThan(1e-6);
    expect(fit.xSigma).toBe(Math.max(fit.xSigmaPropagated, fit.xSigmaScaled!));
  });
});
