/**
 * Phase matching against handbook lattice constants: rings generated here from a
 * handbook a (and, for Mg, a and c) with the d-spacing formulas of International
 * Tables Vol. B ch. 1.1 and the reflection conditions of International Tables Vol. A,
 * independently of core/crystal's ring prediction, must name the right phase with a
 * strain consistent with the handbook value.
 *
 * Sources (values from memory unless stated):
 *   Au   a = 4.0786 Å   NBS Circular 539 Vol. I (Swanson & Tatge 1953)
 *   TiN  a = 4.2417 Å   NBS Monograph 25 (Swanson et al.)
 *   Si   a = 5.431020511 Å  CODATA 2018 (ideal Si, 22.5 °C)
 *   Ge   a = 5.6575 Å   NBS Circular 539 Vol. I
 *   Mg   a = 3.2094 Å, c = 5.2108 Å, P 63/m m c, Mg on 2c (1/3, 2/3, 1/4)
 */
import { describe, expect, it } from 'vitest';
import { findSpaceGroup, type Phase } from '../../core/crystal';
import { phaseLibrary } from '../../core/crystal/phase-library';
import { indexRings, matchPhases, type MeasuredRing } from '../../core/indexing';
import { gaussian, mulberry32 } from '../support/seeded-random';

const FCC = [3, 4, 8, 11, 12, 16, 19, 20];
const DIAMOND = [3, 8, 11, 16, 19, 24, 27, 32];

/** Cubic rings d = a / sqrt(N), relative noise and sigma `rel`, seeded. */
function cubicRings(aA: number, ns: number[], seed: number, rel = 1e-3): MeasuredRing[] {
  const rand = mulberry32(seed);
  return ns.map((n) => {
    const d = aA / Math.sqrt(n);
    return { dA: d * (1 + rel * gaussian(rand)), dSigmaA: rel * d };
  });
}

const library = phaseLibrary();

describe('matchPhases and indexRings name the phase of handbook rings', () => {
  it('indexRings(Au rings, a = 4.0786 Å, library) puts the Au phase first, above the bare cF lattice', () => {
    const rings = cubicRings(4.0786, FCC, 20261220);
    const { candidates } = indexRings(rings, { phases: library });
    const best = candidates[0]!;
    expect(best.phase).toBe('Au');
    expect(best.lattice).toBe('cF');
    expect(best.structure).toBe('fcc');
    expect(Math.abs(best.strainPpm!)).toBeLessThanOrEqual(3 * best.strainSigmaPpm!);
    expect(Math.abs(best.aA - 4.0786)).toBeLessThanOrEqual(3 * best.aSigmaA);
    const lattice = candidates.findIndex((c) => c.kind === 'lattice' && c.lattice === 'cF' && c.structure === 'fcc');
    expect(lattice).toBeGreaterThan(0);
    expect(best.assignments.map((a) => a.hkl.join(''))).toEqual(['111', '200', '220', '311', '222', '400', '331', '420']);
  });

  it('matchPhases(TiN rings, a = 4.2417 Å, library) prefers TiN to the other rock salts by a', () => {
    const rings = cubicRings(4.2417, FCC, 20261221);
    const { matches } = matchPhases(rings, library);
    expect(matches[0]!.phaseId).toBe('TiN');
    const rockSalts = matches.filter((m) => m.structure === 'rock salt' && m.explainedCount === rings.length);
    expect(rockSalts.length).toBeGreaterThan(3);
    for (const m of rockSalts.slice(1)) {
      // Every other rock salt needs the strain a_TiN / a_ref - 1 (within its uncertainty) and scores lower.
      expect(Math.abs(m.strainPpm - (4.2417 / m.referenceCell.aA - 1) * 1e6)).toBeLessThanOrEqual(3 * m.strainSigmaPpm);
      expect(m.score).toBeLessThan(matches[0]!.score);
    }
  });

  it('matchPhases(TiN rings) with a 1 % camera calibration reports TiN and CoO (a 0.45 % apart) as undecided', () => {
    const rings = cubicRings(4.2417, FCC, 20261221);
    const result = matchPhases(rings, library, { calibrationRelativeSigma: 0.01 });
    const ids = (i: number) => result.matches[i]!.phaseId;
    const pair = result.ambiguities.find((a) => [ids(a.candidates[0]), ids(a.candidates[1])].sort().join() === 'CoO,TiN');
    expect(pair?.reason).toMatch(/camera calibration/);
    // Without the calibration uncertainty the same pair is decided by a.
    const sharp = matchPhases(rings, library);
    expect(sharp.ambiguities.some((a) => a.candidates.map((i) => sharp.matches[i]!.phaseId).includes('CoO'))).toBe(false);
  });

  it('matchPhases(Si rings, CODATA a) names Si, not Ge; matchPhases(Ge rings, NBS a) names Ge, not Si', () => {
    const si = matchPhases(cubicRings(5.431020511, DIAMOND, 20261222), library);
    expect(si.matches[0]!.phaseId).toBe('Si');
    expect(si.matches.find((m) => m.phaseId === 'Ge')?.explainedCount ?? 0).toBeLessThan(4);
    const ge = matchPhases(cubicRings(5.6575, DIAMOND, 20261223), library);
    expect(ge.matches[0]!.phaseId).toBe('Ge');
    expect(Math.abs(ge.matches[0]!.strainPpm - (5.6575 / ge.matches[0]!.referenceCell.aA - 1) * 1e6)).toBeLessThanOrEqual(3 * ge.matches[0]!.strainSigmaPpm);
    expect(ge.matches.find((m) => m.phaseId === 'Si')?.explainedCount ?? 0).toBeLessThan(4);
  });

  it('matchPhases(Au + Si mixture) names Au and lists the Si rings as a possible second phase', () => {
    const au = cubicRings(4.0786, FCC.slice(0, 5), 20261224);
    const si = cubicRings(5.431020511, [3, 8, 11], 20261225);
    const rings = [...au, ...si];
    const result = matchPhases(rings, library);
    expect(result.matches[0]!.phaseId).toBe('Au');
    expect(result.secondPhase.map((r) => r.ringIndex)).toEqual([5, 6, 7]);
    for (const r of result.secondPhase) expect(r.phaseIds[0]).toBe('Si');
    expect(result.secondPhaseMatches[0]!.phaseId).toBe('Si');
    expect(result.notes.join('\n')).toMatch(/Au leaves 3 of 8 rings unexplained .* possible second phase; best candidates for them: Si/);
  });
});

describe('matchPhases with a non-cubic user phase', () => {
  const sg = findSpaceGroup('P 63/m m c')!;
  const userMg: Phase = {
    id: 'Mg-film',
    name: 'magnesium (test film)',
    formula: 'Mg',
    structureType: 'hcp',
    spaceGroup: 'P 63/m m c',
    symmetryOperations: sg.operations,
    cell: { aA: 3.2094, bA: 3.2094, cA: 5.2108, alphaDeg: 90, betaDeg: 90, gammaDeg: 120 },
    sites: [{ label: 'Mg1', element: 'Mg', x: 1 / 3, y: 2 / 3, z: 0.25, occupancy: 1, bIsoA2: 0.5 }],
    source: 'test phase; a, c from memory',
    origin: 'json',
  };

  /**
   * Hexagonal d: 1/d^2 = 4 (h^2 + hk + k^2) / (3 a^2) + l^2 / c^2 (International Tables Vol. B
   * ch. 1.1). P 63/m m c with one atom on 2c: a reflection with h - k = 3n and l odd is absent
   * (the 2c special condition hkl: l = 2n or h - k = 3n + 1, 3n + 2; International Tables Vol. A).
   */
  function hexRings(): MeasuredRing[] {
    const a = 3.2094;
    const c = 5.2108;
    const ds = new Set<string>();
    for (let h = 0; h <= 3; h++) for (let k = 0; k <= h; k++) for (let l = 0; l <= 4; l++) {
      if (h + k + l === 0) continue;
      if ((h - k) % 3 === 0 && l % 2 === 1) continue;
      const d = 1 / Math.sqrt((4 * (h * h + h * k + k * k)) / (3 * a * a) + (l * l) / (c * c));
      if (d > 1.1) ds.add(d.toFixed(6));
    }
    const rand = mulberry32(20261226);
    return [...ds].map(Number).sort((x, y) => y - x).map((d) => ({ dA: d * (1 + 1e-3 * gaussian(rand)), dSigmaA: 1e-3 * d }));
  }

  it('matchPhases(Mg rings, [user Mg, library without Mg]) puts the user phase first with its hexagonal cell scaled', () => {
    const rings = hexRings();
    expect(rings.length).toBeGreaterThanOrEqual(7);
    const phases = [userMg, ...library.filter((p) => p.id !== 'Mg')];
    const { matches } = matchPhases(rings, phases);
    const best = matches[0]!;
    expect(best.phaseId).toBe('Mg-film');
    expect(best.lattice).toBe('hP');
    expect(best.explainedCount).toBe(rings.length);
    expect(Math.abs(best.strainPpm)).toBeLessThanOrEqual(3 * best.strainSigmaPpm);
    expect(best.cell.cA / best.cell.aA).toBeCloseTo(5.2108 / 3.2094, 12);
    expect(best.cell.gammaDeg).toBe(120);
    expect(best.assignments.slice(0, 3).map((x) => [...x.hkl].map(Math.abs).sort().join(''))).toEqual(['001', '002', '011']);
    const { candidates } = indexRings(rings, { phases });
    expect(candidates[0]!.phase).toBe('Mg-film');
    expect(candidates[0]!.lattice).toBe('hP');
  });
});
