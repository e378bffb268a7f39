import { describe, expect, it } from 'vitest';
import { findPhase, phaseLibrary } from '../../../../core/crystal/phase-library';
import { indexRings, type MeasuredRing } from '../../../../core/indexing';

const au = findPhase('Au')!;
const w = findPhase('W')!;
const cubic = (aA: number, ns: number[], rel = 1e-3): MeasuredRing[] => ns.map((n) => ({ dA: aA / Math.sqrt(n), dSigmaA: (rel * aA) / Math.sqrt(n) }));
const AU_N = [3, 4, 8, 11, 12, 16];

describe('indexRings', () => {
  it('indexRings(Au rings, { phases: [Au] }) returns the JSON shape the command line prints', () => {
    const { candidates } = indexRings(cubic(4.0786, AU_N), { phases: [au] });
    const best = candidates[0]!;
    expect(best).toMatchObject({ kind: 'phase', lattice: 'cF', structure: 'fcc', phase: 'Au', phaseName: 'gold', figureOfMeritName: 'de Wolff M6' });
    expect(best.assignments[0]).toMatchObject({ dA: 4.0786 / Math.sqrt(3), hkl: [1, 1, 1] });
    expect(typeof best.strainPpm).toBe('number');
    expect(best.unexplained).toEqual([]);
    const lattice = candidates.find((c) => c.kind === 'lattice')!;
    expect(lattice.phase).toBeNull();
    expect(lattice.strainPpm).toBeUndefined();
    expect(JSON.parse(JSON.stringify(best)).assignments[0].hkl).toEqual([1, 1, 1]);
  });

  it('ranks an unstrained phase above the bare lattice it belongs to', () => {
    const { candidates } = indexRings(cubic(4.0786, AU_N), { phases: [au] });
    const phase = candidates.findIndex((c) => c.phase === 'Au');
    const lattice = candidates.findIndex((c) => c.kind === 'lattice' && c.structure === 'fcc' && Math.abs(c.aA - 4.0786) < 0.01);
    expect(phase).toBe(0);
    expect(lattice).toBeGreaterThan(phase);
  });

  it('ranks a phase that needs a 2 % strain below the bare lattice', () => {
    const { candidates } = indexRings(cubic(4.0786 * 1.02, AU_N), { phases: [au], maxCandidates: 40 });
    expect(candidates[0]!).toMatchObject({ kind: 'lattice', structure: 'fcc' });
    const phase = candidates.find((c) => c.phase === 'Au')!;
    expect(phase.strainPpm!).toBeCloseTo(20000, 2);
    expect(phase.score).toBeLessThan(candidates[0]!.score - 10);
  });

  it('lowers a phase by the cost of its missing strong ring, and not the lattice', () => {
    const all = indexRings(cubic(4.0786, AU_N), { phases: [au] }).candidates;
    const no200 = indexRings(cubic(4.0786, AU_N.filter((n) => n !== 4)), { phases: [au] }).candidates;
    const margin = (cs: typeof all) => cs.find((c) => c.phase === 'Au')!.score - cs.find((c) => c.kind === 'lattice' && c.structure === 'fcc')!.score;
    expect(no200.find((c) => c.phase === 'Au')!.missing.map((m) => m.hkl.join(''))).toEqual(['200']);
    expect(margin(all) - margin(no200)).toBeGreaterThan(0.5);
  });

  it('reports a phase equivalent to a different lattice, but not to its own lattice', () => {
    // bcc N = 2..12: cI(a) and cP(a / sqrt 2) predict the same rings.
    const result = indexRings(cubic(3.1648, [2, 4, 6, 8, 10, 12]), { phases: [w] });
    const label = (i: number) => {
      const c = result.candidates[i]!;
      return c.phase ?? `${c.lattice} ${c.aA.toFixed(3)}`;
    };
    const pairs = result.ambiguities.map((a) => a.candidates.map(label).sort().join(' & '));
    expect(pairs).toContain('W & cP 2.238');
    expect(pairs).toContain('cI 3.165 & cP 2.238');
    expect(pairs).not.toContain('W & cI 3.165');
  });

  it('keeps the best lattice-only candidate even when phases fill maxCandidates', () => {
    const { candidates } = indexRings(cubic(4.0786, AU_N), { phases: phaseLibrary(), maxCandidates: 3 });
    expect(candidates).toHaveLength(3);
    expect(candidates.some((c) => c.kind === 'lattice')).toBe(true);
    expect(candidates[0]!.phase).toBe('Au');
  });

  it('without phases returns lattice candidates only and no second phase', () => {
    const result = indexRings(cubic(4.0786, AU_N));
    expect(result.candidates.every((c) => c.kind === 'lattice' && c.phase === null)).toBe(true);
    expect(result.secondPhase).toEqual([]);
    expect(result.candidates[0]!.structure).toBe('fcc');
  });

  it('rejects a single ring with a message that says what to do', () => {
    expect(() => indexRings(cubic(4, [3]), { phases: [au] })).toThrow(/at least 2 measured rings are needed to index rings; got 1\. Measure more rings/);
  });
});
