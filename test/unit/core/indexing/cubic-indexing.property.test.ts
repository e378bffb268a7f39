/**
 * Property test of indexCubic on 1000 invented cubic patterns (seed 20261202):
 * structure uniform among cP / cI / cF / diamond, a uniform in [2.5, 6.5] Å,
 * the first 6-12 allowed rings with the weak ones dropped (kinematic weight
 * m |F|^2 f(s)^2 d^2, f = exp(-2 s^2), below 2% of the strongest), 0.2%
 * relative Gaussian noise on d with sigma = 0.2% d, and one spurious ring at a
 * random d in the observed range.
 *
 * Success: the top candidate has the true structure and a within 3 sigma of
 * the true a. Cases where the top candidate is wrong but an ambiguity pairs it
 * with a correct candidate (the data cannot decide) are counted separately.
 * The floor the issue sets, 95%, is asserted on the strict top-1 rate and on
 * the rate that also counts reported equivalences.
 */
import { describe, expect, it } from 'vitest';
import { CUBIC_STRUCTURES, indexCubic, type CubicCandidate } from '../../../../core/indexing';
import { noisyCase, type NoisyCase } from './cubic-pattern-generator';
import { mulberry32 } from '../../../support/seeded-random';

const SEED = 20261202;
const CASES = 1000;

function correct(c: CubicCandidate | undefined, truth: NoisyCase): boolean {
  return c !== undefined && c.structure === truth.structure && Math.abs(c.aA - truth.aA) <= 3 * c.aSigmaA;
}

/** The ranking the issue first proposed: explained count, then figure of merit, then the smaller primitive cell. */
function countFirst(cs: readonly CubicCandidate[]): CubicCandidate | undefined {
  return [...cs].sort(
    (p, q) => q.explainedCount - p.explainedCount || q.figureOfMerit - p.figureOfMerit || p.primitiveVolumeA3 - q.primitiveVolumeA3,
  )[0];
}

describe('indexCubic on 1000 seeded random cubic patterns', () => {
  it('puts the true lattice and a (within 3 sigma) first in at least 95% of cases', () => {
    const rand = mulberry32(SEED);
    let top1 = 0;
    let equivalent = 0;
    let countFirstTop1 = 0;
    const failures: string[] = [];
    const started = Date.now();
    for (let i = 0; i < CASES; i++) {
      const structure = CUBIC_STRUCTURES[Math.floor(rand() * 4)]!;
      const aA = 2.5 + 4 * rand();
      const count = 6 + Math.floor(rand() * 7);
      const truth = noisyCase(rand, structure, aA, count);
      const result = indexCubic(truth.rings);
      const best = result.candidates[0];
      if (correct(best, truth)) top1++;
      else if (
        result.ambiguities.some((amb) => amb.candidates.includes(0) && correct(result.candidates[amb.candidates[0] === 0 ? amb.candidates[1] : amb.candidates[0]], truth))
      ) {
        equivalent++;
      } else if (failures.length < 12) {
        failures.push(`${structure} a=${aA.toFixed(4)} N=[${truth.keptN.join(',')}] spurious d=${truth.spuriousDA.toFixed(4)} -> ${best?.label ?? 'none'}`);
      }
      if (correct(countFirst(result.candidates), truth)) countFirstTop1++;
    }
    const seconds = (Date.now() - started) / 1000;
    console.log(
      `indexCubic property test, seed ${SEED}, ${CASES} cases in ${seconds.toFixed(1)} s:\n` +
        `  top-1 correct:                          ${((100 * top1) / CASES).toFixed(1)}%\n` +
        `  top-1 equivalent to truth (ambiguity):  ${((100 * equivalent) / CASES).toFixed(1)}%\n` +
        `  correct or reported equivalent:         ${((100 * (top1 + equivalent)) / CASES).toFixed(1)}%\n` +
        `  (for comparison, count-first ranking:   ${((100 * countFirstTop1) / CASES).toFixed(1)}% top-1)\n` +
        (failures.length ? `  first failures:\n    ${failures.join('\n    ')}` : ''),
    );
    expect(top1 / CASES).toBeGreaterThanOrEqual(0.95);
    expect((top1 + equivalent) / CASES).toBeGreaterThanOrEqual(0.95);
  });
});
