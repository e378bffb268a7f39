/**
 * Benchmark: indexRings with 15 rings (8 of Au, 5 of Si, 2 spurious; seed 20261230)
 * against the whole phase library, as a ratio to a trivial pass over the same data:
 * for every phase and ring, a linear scan of the phase's predicted d for the nearest one
 * (predicted d computed once, outside the timing). Ring prediction alone (predictRings
 * for every library phase) is timed too, to show where the time goes. All timings are
 * taken in the same run and printed as ratios; nothing is asserted.
 */
import { bench, describe } from 'vitest';
import { predictRings } from '../../core/crystal';
import { phaseLibrary } from '../../core/crystal/phase-library';
import { indexRings, type MeasuredRing } from '../../core/indexing';
import { gaussian, mulberry32 } from '../support/seeded-random';

const rand = mulberry32(20261230);
const noisy = (d: number): MeasuredRing => {
  const dA = d * (1 + 1e-3 * gaussian(rand));
  return { dA, dSigmaA: 1e-3 * dA };
};
const rings: MeasuredRing[] = [
  ...[3, 4, 8, 11, 12, 16, 19, 20].map((n) => noisy(4.0786 / Math.sqrt(n))),
  ...[3, 8, 11, 16, 19].map((n) => noisy(5.431020511 / Math.sqrt(n))),
  noisy(2.9),
  noisy(1.71),
];
const library = phaseLibrary();
const dMinA = Math.min(...rings.map((r) => r.dA)) * 0.95;
const predictedD = library.map((p) => predictRings(p, { dMinA }).map((r) => r.dA));

function trivialPass(): number {
  let sum = 0;
  for (const ds of predictedD) {
    for (const ring of rings) {
      let best = Infinity;
      for (const d of ds) best = Math.min(best, Math.abs(d - ring.dA));
      sum += best;
    }
  }
  return sum;
}
const fullIndexing = () => indexRings(rings, { phases: library }).candidates.length;
const ringPrediction = () => library.reduce((n, p) => n + predictRings(p, { dMinA }).length, 0);

/** Median time of `fn` in ms over `repeats` runs of `inner` calls each. */
function medianMs(fn: () => unknown, inner: number, repeats = 7): number {
  fn();
  const times: number[] = [];
  for (let r = 0; r < repeats; r++) {
    const t0 = performance.now();
    for (let i = 0; i < inner; i++) fn();
    times.push((performance.now() - t0) / inner);
  }
  return times.sort((a, b) => a - b)[Math.floor(repeats / 2)]!;
}

describe('indexing 15 rings against the phase library', () => {
  const trivial = medianMs(trivialPass, 2000);
  const prediction = medianMs(ringPrediction, 3);
  const full = medianMs(fullIndexing, 3);
  console.log(
    `indexRings, 15 rings x ${library.length} phases: ${full.toFixed(1)} ms per call; ` +
      `trivial nearest-d pass ${(trivial * 1000).toFixed(1)} µs; ratio ${(full / trivial).toFixed(0)}x. ` +
      `Ring prediction alone ${prediction.toFixed(1)} ms (${((100 * prediction) / full).toFixed(0)} % of the call).`,
  );
  let sink = 0; // keeps results alive so nothing is optimised away
  bench('indexRings(15 rings, whole library)', () => void (sink += fullIndexing()), { iterations: 5 });
  bench('predictRings for every library phase', () => void (sink += ringPrediction()), { iterations: 5 });
  bench('trivial nearest-d pass over the same data', () => void (sink += trivialPass()));
});
