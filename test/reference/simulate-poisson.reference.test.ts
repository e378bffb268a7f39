/**
 * The simulator's random deviates against scipy.stats (Debian's python3-scipy): seeded
 * Poisson draws at means on both sides of the switch from inversion to PTRS, tested
 * against scipy's Poisson law with scipy's chi-square test; the normal deviates with
 * scipy's Kolmogorov-Smirnov test; ln k! against scipy.special.gammaln.
 */
import { describe, expect, it } from 'vitest';
import { logFactorial, poissonDeviate, randomStream } from '../../core/simulate';
import { referenceAvailable, runPythonJson } from './python-reference';

describe.runIf(referenceAvailable('scipy', 'numpy'))('simulator deviates against scipy.stats', () => {
  it('Poisson draws (100000 per mean, seeds 101-106) follow scipy.stats.poisson at means 0.7, 6, 10, 63.2, 4000 and 250000 (chi-square p > 0.001)', () => {
    const means = [0.7, 6, 10, 63.2, 4000, 250000];
    const samples = means.map((mean, i) => {
      const r = randomStream(101 + i);
      return Array.from({ length: 100_000 }, () => poissonDeviate(mean, r));
    });
    const ref = runPythonJson<{ mean: number; cells: number; chi2: number; p: number }[]>(
      `
import numpy as np
from scipy import stats
out = []
for mean, k in zip(INPUT["means"], INPUT["samples"]):
    k = np.array(k)
    n = len(k)
    # Cells of expected count >= 20 around the mode, tails pooled into the end cells.
    lo, hi = int(stats.poisson.ppf(1e-4, mean)), int(stats.poisson.isf(1e-4, mean))
    while n * stats.poisson.pmf(lo, mean) < 20 and lo < mean: lo += 1
    while n * stats.poisson.pmf(hi, mean) < 20 and hi > mean: hi -= 1
    edges = np.arange(lo, hi + 1)
    observed = [np.sum(k < lo)] + [np.sum(k == e) for e in edges] + [np.sum(k > hi)]
    expected = [stats.poisson.cdf(lo - 1, mean)] + list(stats.poisson.pmf(edges, mean)) + [stats.poisson.sf(hi, mean)]
    expected = np.array(expected) * n
    keep = expected >= 5
    obs = np.array(observed, dtype=float)[keep]; exp = expected[keep]
    exp *= obs.sum() / exp.sum()
    chi2, p = stats.chisquare(obs, exp)
    out.append({"mean": mean, "cells": int(keep.sum()), "chi2": float(chi2), "p": float(p)})
print(json.dumps(out))
`,
      { means, samples },
    );
    for (const r of ref) {
      console.log(`Poisson(${r.mean}): chi-square ${r.chi2.toFixed(1)} on ${r.cells - 1} degrees of freedom, p = ${r.p.toFixed(3)}`);
      expect(r.cells).toBeGreaterThan(2);
      expect(r.p).toBeGreaterThan(0.001);
    }
  });

  it('normal deviates (50000, seed 202) pass scipy.stats.kstest against the standard normal (p > 0.001)', () => {
    const r = randomStream(202);
    const z = Array.from({ length: 50_000 }, () => r.normal());
    const ref = runPythonJson<{ p: number; d: number }>(
      `
from scipy import stats
res = stats.kstest(INPUT, "norm")
print(json.dumps({"p": float(res.pvalue), "d": float(res.statistic)}))
`,
      z,
    );
    console.log(`normal deviates: Kolmogorov-Smirnov D = ${ref.d.toFixed(5)}, p = ${ref.p.toFixed(3)}`);
    expect(ref.p).toBeGreaterThan(0.001);
  });

  it('logFactorial(k) equals scipy.special.gammaln(k + 1) to 1e-14 relative from 0 to 1e9', () => {
    const ks = [0, 1, 2, 10, 100, 255, 256, 257, 1000, 12345, 1e6, 123456789, 1e9];
    const ref = runPythonJson<number[]>(`
from scipy.special import gammaln
print(json.dumps([float(gammaln(k + 1)) for k in INPUT]))
`, ks);
    ks.forEach((k, i) => expect(Math.abs(logFactorial(k) - ref[i]!)).toBeLessThanOrEqual(1e-14 * Math.max(1, ref[i]!)));
  });
});
