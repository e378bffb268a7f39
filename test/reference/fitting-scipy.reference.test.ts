/** The Levenberg-Marquardt fit against scipy.optimize.curve_fit (python3-scipy) on the same data. */
import { describe, expect, it } from 'vitest';
import { levenbergMarquardt } from '../../core/fitting';
import { gaussian, mulberry32 } from '../support/seeded-random';
import { referenceAvailable, runPythonJson } from './python-reference';

describe.runIf(referenceAvailable('scipy'))('levenbergMarquardt against scipy.optimize.curve_fit', () => {
  it('finds the same Gaussian-on-a-slope parameters and absolute covariance (seed 4242)', () => {
    const rand = mulberry32(4242);
    const x = Array.from({ length: 80 }, (_, i) => i * 0.25);
    const sigma = 0.2;
    const truth = [10, 9.3, 1.4, 2, -0.05];
    const f = (p: ArrayLike<number>, v: number) => p[0]! * Math.exp(-0.5 * ((v - p[1]!) / p[2]!) ** 2) + p[3]! + p[4]! * v;
    const y = x.map((v) => f(truth, v) + sigma * gaussian(rand));
    const fit = levenbergMarquardt(
      {
        observationCount: x.length,
        parameterCount: 5,
        evaluate(p, res, jac) {
          x.forEach((v, i) => {
            const z = (v - p[1]!) / p[2]!;
            const g = Math.exp(-0.5 * z * z);
            res[i] = (y[i]! - f(p, v)) / sigma;
            if (jac) {
              const row = i * 5;
              jac[row] = -g / sigma;
              jac[row + 1] = (-p[0]! * g * z) / p[2]! / sigma;
              jac[row + 2] = (-p[0]! * g * z * z) / p[2]! / sigma;
              jac[row + 3] = -1 / sigma;
              jac[row + 4] = -v / sigma;
            }
          });
        },
      },
      [8, 9, 1, 0, 0],
    );
    const ref = runPythonJson<{ p: number[]; cov: number[][] }>(
      `
import numpy as np
from scipy.optimize import curve_fit
x = np.array(INPUT["x"]); y = np.array(INPUT["y"])
f = lambda v, a, m, s, c, b: a*np.exp(-0.5*((v-m)/s)**2) + c + b*v
p, cov = curve_fit(f, x, y, p0=[8, 9, 1, 0, 0], sigma=np.full(len(x), INPUT["sigma"]), absolute_sigma=True, method="lm")
print(json.dumps({"p": p.tolist(), "cov": cov.tolist()}))
`,
      { x, y, sigma },
    );
    for (let k = 0; k < 5; k++) {
      expect(Math.abs(fit.parameters[k]! - ref.p[k]!)).toBeLessThan(1e-6 * (1 + Math.abs(ref.p[k]!)));
      expect(Math.abs(Math.sqrt(fit.covariance![k * 5 + k]!) / Math.sqrt(ref.cov[k]![k]!) - 1)).toBeLessThan(1e-4);
    }
  });
});
