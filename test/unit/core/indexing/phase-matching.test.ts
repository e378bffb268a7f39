import { describe, expect, it } from 'vitest';
import { predictRings } from '../../../../core/crystal';
import { findPhase } from '../../../../core/crystal/phase-library';
import { bravaisSymbol, matchPhases, PHASE_MATCH_DEFAULTS, type MeasuredRing } from '../../../../core/indexing';

const au = findPhase('Au')!;
const si = findPhase('Si')!;
const w = findPhase('W')!;

/** Rings at the phase's own predicted d (scaled by `scale`), sigma = rel d. */
function ringsOf(id: string, count: number, scale = 1, rel = 1e-3, withIntensity = false): MeasuredRing[] {
  return predictRings(findPhase(id)!, { dMinA: 0.8 })
    .slice(0, count)
    .map((r) => ({ dA: r.dA * scale, dSigmaA: rel * r.dA * scale, ...(withIntensity ? { intensity: r.relativeIntensity } : {}) }));
}

describe('bravaisSymbol', () => {
  it.each([
    ['F m -3 m', 'cF'],
    ['I m -3 m', 'cI'],
    ['P 63/m m c', 'hP'],
    ['R -3 c:H', 'hR'],
    ['I 41/a m d:1', 'tI'],
    ['not a group', ''],
  ])('bravaisSymbol(%s) = %j', (symbol, expected) => {
    expect(bravaisSymbol(symbol)).toBe(expected);
  });
});

describe('matchPhases', () => {
  it('refines the scale: Au rings 1 % too large give Au with a strain of +10000 ppm', () => {
    const best = matchPhases(ringsOf('Au', 6, 1.01), [au, si, w]).matches[0]!;
    expect(best.phaseId).toBe('Au');
    expect(best.strainPpm).toBeCloseTo(10000, 3);
    expect(best.aA).toBeCloseTo(4.0786 * 1.01, 9);
    expect(best.cell.aA).toBeCloseTo(best.aA, 12);
    expect(best.assignments.every((a) => Math.abs(a.residualSigma) < 1e-6)).toBe(true);
  });

  it('drops a phase whose rings need a strain outside strainWindow', () => {
    const { matches } = matchPhases(ringsOf('Au', 6, 1.04), [au]);
    expect(matches.every((m) => m.explainedCount < 6)).toBe(true);
    const wider = matchPhases(ringsOf('Au', 6, 1.04), [au], { strainWindow: 0.05 }).matches[0]!;
    expect(wider.explainedCount).toBe(6);
    expect(wider.strainPpm).toBeCloseTo(40000, 3);
  });

  it('scores the strain as ln(ln 10) - ln(sqrt(2 pi) t) - e^2 / (2 t^2)', () => {
    const m = matchPhases(ringsOf('Au', 6, 1.004), [au]).matches[0]!;
    const e = m.strainPpm / 1e6;
    const fitSigma = m.scaleSigma; // no calibration: all fit
    const t2 = PHASE_MATCH_DEFAULTS.strainPriorSigma ** 2 + fitSigma ** 2;
    expect(m.scoreParts.strain).toBeCloseTo(Math.log(Math.log(10)) - 0.5 * Math.log(2 * Math.PI * t2) - (e * e) / (2 * t2), 9);
  });

  it('adds the calibration uncertainty to the strain uncertainty in quadrature', () => {
    const rings = ringsOf('Au', 6, 1.002);
    const plain = matchPhases(rings, [au]).matches[0]!;
    const calibrated = matchPhases(rings, [au], { calibrationRelativeSigma: 0.002 }).matches[0]!;
    expect(calibrated.strainPpm).toBeCloseTo(plain.strainPpm, 6);
    expect(calibrated.strainSigmaPpm).toBeCloseTo(Math.hypot(plain.strainSigmaPpm, 2000 * calibrated.scale), 6);
  });

  it('charges each predicted ring in range that is missing by its strength: 0.5 ln(1 - 0.95 I / (I + 10))', () => {
    const rings = ringsOf('Au', 8).filter((_, i) => i !== 1); // 2 0 0 (I = 45) left out
    const m = matchPhases(rings, [au], { strongRelativeIntensity: 0 }).matches[0]!;
    expect(m.missing.map((x) => x.hkl.join(''))).toEqual(['200']);
    const expected = 0.5 * m.missing.reduce((s, x) => s + Math.log(1 - (0.95 * x.relativeIntensity) / (x.relativeIntensity + 10)), 0);
    expect(m.scoreParts.intensity).toBeCloseTo(expected, 9);
    const full = matchPhases(ringsOf('Au', 8), [au]).matches[0]!;
    expect(full.scoreParts.intensity).toBe(0);
    expect(expected).toBeLessThan(-0.7);
  });

  it('lists only missing rings at least strongRelativeIntensity strong', () => {
    // 2 0 0 (I = 45) and 2 2 2 (I = 6) left out; rings outside the measured range never count.
    const rings = ringsOf('Au', 8).filter((_, i) => i !== 1 && i !== 4);
    const m = matchPhases(rings, [au]).matches[0]!;
    expect(m.missing.map((x) => x.hkl.join(''))).toEqual(['200']);
    expect(matchPhases(ringsOf('Au', 8).slice(1), [au]).matches[0]!.missing).toEqual([]);
  });

  it('rewards measured intensities that follow the kinematic ones', () => {
    const agree = ringsOf('Au', 6, 1, 1e-3, true);
    const reversed = agree.map((r, i) => ({ ...r, intensity: agree[agree.length - 1 - i]!.intensity }));
    const good = matchPhases(agree, [au]).matches[0]!;
    const bad = matchPhases(reversed, [au]).matches[0]!;
    expect(good.scoreParts.position).toBeCloseTo(bad.scoreParts.position, 9);
    expect(good.scoreParts.intensity).toBeGreaterThan(bad.scoreParts.intensity + 2);
  });

  it('with refineScale false keeps s = 1 and lets the calibration widen the windows', () => {
    const rings = ringsOf('Au', 6, 1.005);
    expect(matchPhases(rings, [au], { refineScale: false }).matches[0]?.explainedCount ?? 0).toBe(0);
    const loose = matchPhases(rings, [au], { refineScale: false, calibrationRelativeSigma: 0.003 }).matches[0]!;
    expect(loose.scale).toBe(1);
    expect(loose.explainedCount).toBe(6);
  });

  it('says when a runner-up explains the same rings and only a separates them', () => {
    const { notes } = matchPhases(ringsOf('Au', 6), [au, findPhase('Ag')!]);
    expect(notes.join('\n')).toMatch(/Ag explains the same rings as Au with a strain of -18\d\d ppm/);
  });

  it('weighs each line in the position term by its odds of showing beside the weakest measured ring: CaF2 rings rank CaF2 above Si', () => {
    // Regression (accuracy benchmark case caf2-1k-halo): a fluorite's rings with h + k + l = 4n + 2 are
    // kinematically 2e-4 to 2e-2 of its strongest, so its rings look diamond-like. With every predicted
    // line counted as a position, Si (a = 5.431 Å, strain +0.58 %) outranked CaF2 (strain 0) by 4.4 nats.
    // Rings: CaF2's own down to 0.55 Å with relativeIntensity >= 0.05 (what a pattern of 2000:1 range
    // shows), 2 0 0 (2.4) left out as if hidden under a carbon halo; intensities the kinematic ones.
    const caf2 = findPhase('CaF2')!;
    const rings = predictRings(caf2, { dMinA: 0.55 })
      .filter((r) => r.relativeIntensity >= 0.05 && r.families[0]!.hkl.join(' ') !== '2 0 0')
      .map((r) => ({ dA: r.dA, dSigmaA: 1e-4 * r.dA, intensity: r.relativeIntensity }));
    expect(rings.length).toBe(24);
    const { matches } = matchPhases(rings, [si, caf2]);
    expect(matches.map((m) => m.phaseId)).toEqual(['CaF2', 'Si']);
    expect(matches[0]!.score - matches[1]!.score).toBeGreaterThan(1);
    // Without intensities nothing tells the pattern's range: every line counts, and the same rings
    // score their positions exactly as a lattice would.
    const bare = matchPhases(rings.map((r) => ({ dA: r.dA, dSigmaA: r.dSigmaA })), [caf2]).matches[0]!;
    const withI = matches[0]!;
    expect(bare.scoreParts.position).toBeLessThan(withI.scoreParts.position - 3);
  });

  it('rejects bad phases and options by name', () => {
    const rings = ringsOf('Au', 3);
    expect(() => matchPhases(rings, 'Au' as never)).toThrow(/phases must be an array/);
    expect(() => matchPhases(rings, [{ id: 'x' } as never])).toThrow(/phases\[0\] is not a Phase/);
    expect(() => matchPhases(rings, [au], { strainWindow: 0.6 })).toThrow(/options\.strainWindow must be below 0\.5/);
    expect(() => matchPhases(rings, [au], { intensityWeight: -1 })).toThrow(/options\.intensityWeight/);
    expect(() => matchPhases(rings, [au], { refineScale: 'yes' as never })).toThrow(/options\.refineScale/);
    expect(() => matchPhases([], [au])).toThrow(/at least 1 measured rings/);
  });
});
