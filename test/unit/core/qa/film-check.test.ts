/**
 * checkFilm on simulated TiN films measured with a known (calibrated) camera:
 * the decision rule of JCGM 106:2012 with guard bands (expanded uncertainty, k = 2).
 */
import { describe, expect, it } from 'vitest';
import { cameraUncertaintyBudget, standardReferenceUncertainty } from '../../../../core/calibration';
import { findPhase, phaseLibrary } from '../../../../core/crystal';
import { analyze, type AnalysisResult } from '../../../../core/pipeline';
import { checkFilm } from '../../../../core/qa';
import { simulatePattern, type SimulationSpec } from '../../../../core/simulate';
import { loadOpenCv } from '../../../../app/node/load-opencv';

const LP = 27000;
const tin = findPhase('TiN')!;

function measure(phases: SimulationSpec['phases'], seed: number, calibrated = true, cameraRelativeSigma = 50e-6): AnalysisResult {
  const spec: SimulationSpec = {
    widthPx: 768,
    heightPx: 768,
    voltageV: 200e3,
    cameraLengthPx: LP,
    frame: { centerXPx: 383.1, centerYPx: 377.6, axisRatio: 1.008, angleDeg: 25 },
    phases,
    peakCounts: 1500,
    ringFwhmPx: 3,
    background: { levelCounts: 300 },
    seed,
  };
  return analyze(
    simulatePattern(spec).raster,
    {
      // A calibration with a 50 ppm standard uncertainty on the camera length.
      camera: { voltageV: 200e3, cameraLengthPx: LP, cameraLengthSigmaPx: calibrated ? cameraRelativeSigma * LP : 0, source: 'test', calibrated },
      image: { bitsPerSample: 16, sampleFormat: 'uint' },
      phases: phaseLibrary(),
    },
    undefined,
    loadOpenCv(),
  );
}

describe('checkFilm', () => {
  it('passes a TiN film strained by 0.1 % against a 0.5 % tolerance, naming the deviation', () => {
    const c = checkFilm(measure([{ phase: tin, latticeScale: 1.001 }], 501), tin, { tolerance: 0.005, library: phaseLibrary() });
    expect(c.verdict).toBe('pass');
    expect(c.measured!.deviation).toBeCloseTo(0.001, 4);
    expect(c.reasons[0]).toMatch(/inside the tolerance/);
  });

  it('fails a film strained by 1.5 % against a 0.5 % tolerance', () => {
    const c = checkFilm(measure([{ phase: tin, latticeScale: 1.015 }], 502), tin, { tolerance: 0.005 });
    expect(c.verdict).toBe('fail');
    expect(c.reasons[0]).toMatch(/outside the tolerance/);
  });

  it('is inconclusive when the tolerance is narrower than the expanded uncertainty, never a pass', () => {
    const c = checkFilm(measure([{ phase: tin, latticeScale: 1.0 }], 503), tin, { tolerance: 5e-5 });
    expect(c.verdict).toBe('inconclusive');
    expect(c.reasons[0]).toMatch(/wider than the tolerance/);
  });

  it('is inconclusive, never a pass, for a film 0.1 % off when the camera budget (1 % reproducibility) is wider than a 0.5 % tolerance, and names that term', () => {
    // A 0.1 % film passes at 0.5 % with a 50 ppm camera (above); with a 1 % transfer term U = 2 x 1.0 % > 0.5 %.
    const budget = cameraUncertaintyBudget(50e-6, standardReferenceUncertainty({ id: 'Au', aA: 4.0786 }), { relative: 0.01, source: 'given' });
    const c = checkFilm(measure([{ phase: tin, latticeScale: 1.001 }], 501, true, budget.totalRelative), tin, { tolerance: 0.005, library: phaseLibrary(), cameraUncertainty: budget });
    expect(c.verdict).toBe('inconclusive');
    expect(c.measured!.expandedUncertainty).toBeGreaterThanOrEqual(2 * budget.totalRelative);
    expect(c.measured!.deviation).toBeCloseTo(0.001, 3); // the error against the simulated strain does not depend on the budget
    expect(c.reasons[0]).toMatch(/wider than the tolerance .*the camera's reproducibility between images \(1\.000 %\) dominates/);
  });

  it('fails a film with a second phase and names candidates for its rings', () => {
    const c = checkFilm(measure([{ phase: tin }, { phase: findPhase('Si')!, weight: 0.6 }], 504), tin, { tolerance: 0.005, library: phaseLibrary() });
    expect(c.verdict).toBe('fail');
    expect(c.unexplainedRings.length).toBeGreaterThan(0);
    expect(c.unexplainedRings.flatMap((u) => u.candidates)).toContain('Si');
    expect(c.reasons.join(' ')).toMatch(/second phase/);
  });

  it('fails when the rings belong to another phase, and is inconclusive with a nominal camera', () => {
    const gold = checkFilm(measure([{ phase: findPhase('Au')! }], 505), tin, { tolerance: 0.005 });
    expect(gold.verdict).toBe('fail');
    expect(gold.reasons[0]).toMatch(/not those of TiN/);
    const nominal = checkFilm(measure([{ phase: tin }], 506, false), tin, { tolerance: 0.005 });
    expect(nominal.verdict).toBe('inconclusive');
    expect(nominal.reasons.join(' ')).toMatch(/nominal, not calibrated/);
  });

  it('rejects a tolerance that is not a relative value', () => {
    expect(() => checkFilm(measure([{ phase: tin }], 507), tin, { tolerance: 5 })).toThrow(/tolerance must be a relative value/);
  });
});
