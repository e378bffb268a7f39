/**
 * Keeps the accuracy benchmark (test/bench/accuracy, `npm run bench:accuracy`) from
 * rotting: its case table is well formed and spans what issue 3, section 5 asks for,
 * and three of its small cases run end to end (simulate, analyze, compare with the
 * truth) against the same targets the benchmark reports, applied to each case alone.
 * The full benchmark takes minutes and is not part of `npm test`.
 */
import { describe, expect, it } from 'vitest';
import { loadOpenCv } from '../../../app/node/load-opencv';
import { findPhase } from '../../../core/crystal';
import { electronWavelengthA, ringRadiusPx } from '../../../core/physics';
import { FULL_SCALE_ADU, resolveSimulationSpec } from '../../../core/simulate';
import { ACCURACY_CASES, cameraLengthPlacing, caseSimulationSpec, type AccuracyCase } from '../../bench/accuracy/accuracy-cases';
import { caseFigures, summarise, TARGETS } from '../../bench/accuracy/accuracy-summary';
import { axisAngleDifferenceDeg, evaluateCase, type CaseEvaluation } from '../../bench/accuracy/evaluate-case';

const side = (c: AccuracyCase) => Math.max(c.spec.widthPx, c.spec.heightPx);
const frame = (c: AccuracyCase) => c.spec.frame;
const inside = (c: AccuracyCase) => frame(c).centerXPx >= 0 && frame(c).centerYPx >= 0 && frame(c).centerXPx <= c.spec.widthPx - 1 && frame(c).centerYPx <= c.spec.heightPx - 1;

describe('accuracy benchmark case table', () => {
  it('has at least 30 cases with unique ids and seeds, invented descriptions and library phases, all valid specs', () => {
    expect(ACCURACY_CASES.length).toBeGreaterThanOrEqual(30);
    expect(new Set(ACCURACY_CASES.map((c) => c.id)).size).toBe(ACCURACY_CASES.length);
    expect(new Set(ACCURACY_CASES.map((c) => c.seed)).size).toBe(ACCURACY_CASES.length);
    for (const c of ACCURACY_CASES) {
      expect(c.description.length, c.id).toBeGreaterThan(10);
      const phase = findPhase(c.phase.id);
      expect(phase, c.id).toBeDefined();
      expect(() => resolveSimulationSpec(caseSimulationSpec(c, phase!)), c.id).not.toThrow();
    }
  });

  it('spans image sides 1024 to 4096, 80 to 300 kV, peak counts about 50 to 5000, q 1.000 to 1.030 at angles all round', () => {
    const sides = ACCURACY_CASES.map(side);
    expect(Math.min(...sides)).toBe(1024);
    expect(Math.max(...sides)).toBe(4096);
    expect(new Set(sides).size).toBeGreaterThanOrEqual(4);
    const kv = ACCURACY_CASES.map((c) => c.spec.voltageV / 1000);
    expect(Math.min(...kv)).toBe(80);
    expect(Math.max(...kv)).toBe(300);
    expect(new Set(kv).size).toBeGreaterThanOrEqual(4);
    const counts = ACCURACY_CASES.map((c) => c.spec.peakCounts);
    expect(Math.min(...counts)).toBeLessThanOrEqual(60);
    expect(Math.max(...counts)).toBeGreaterThanOrEqual(5000);
    const q = ACCURACY_CASES.map((c) => frame(c).axisRatio);
    expect(Math.min(...q)).toBe(1);
    expect(Math.max(...q)).toBe(1.03);
    // Elliptical cases in every 45-degree sector of the half turn.
    const sectors = new Set(ACCURACY_CASES.filter((c) => frame(c).axisRatio >= 1.005).map((c) => Math.floor(frame(c).angleDeg / 45)));
    expect([...sectors].sort()).toEqual([0, 1, 2, 3]);
  });

  it('covers beam stops with stems over the centre, texture, spotty rings, off-centre and outside centres, halos, hot pixels and a saturated direct beam', () => {
    const has = (test: (c: AccuracyCase) => boolean) => ACCURACY_CASES.filter(test).length;
    // A stop centred on the pattern (the default) with a stem (default width: the disc's radius).
    expect(has((c) => !!c.spec.beamStop && c.spec.beamStop.centerXPx === undefined && (c.spec.beamStop.stemWidthPx ?? 1) > 0)).toBeGreaterThanOrEqual(10);
    expect(has((c) => c.phase.texture?.shape === 'cosine')).toBeGreaterThanOrEqual(2);
    expect(has((c) => c.phase.texture?.shape === 'arcs')).toBeGreaterThanOrEqual(1);
    expect(has((c) => (c.phase.grainsPerRing ?? 0) > 0)).toBeGreaterThanOrEqual(2);
    expect(has((c) => !inside(c))).toBeGreaterThanOrEqual(2);
    const offCentre = (c: AccuracyCase) =>
      inside(c) && Math.hypot(frame(c).centerXPx - (c.spec.widthPx - 1) / 2, frame(c).centerYPx - (c.spec.heightPx - 1) / 2) > 0.15 * Math.min(c.spec.widthPx, c.spec.heightPx);
    expect(has(offCentre)).toBeGreaterThanOrEqual(2);
    expect(has((c) => (c.spec.halos ?? []).length > 0)).toBeGreaterThanOrEqual(3);
    expect(has((c) => (c.spec.hotPixels?.count ?? 0) > 0)).toBeGreaterThanOrEqual(3);
    // No stop and a direct beam (default 1e6 e per pixel) that exceeds full scale at the detector's gain.
    const saturates = (c: AccuracyCase) =>
      !c.spec.beamStop && c.spec.directBeam !== null && inside(c) && (c.spec.directBeam?.peakCounts ?? 1e6) * (c.spec.detector?.gainAduPerElectron ?? 1) > FULL_SCALE_ADU;
    expect(has(saturates)).toBeGreaterThanOrEqual(2);
  });

  it('uses phases of many structure types, including a hexagonal one', () => {
    const types = new Set(ACCURACY_CASES.map((c) => findPhase(c.phase.id)!.structureType));
    for (const t of ['fcc', 'bcc', 'rock salt', 'diamond', 'zincblende', 'fluorite', 'spinel', 'hcp', 'wurtzite']) expect(types.has(t), t).toBe(true);
    expect(new Set(ACCURACY_CASES.map((c) => c.phase.id)).size).toBeGreaterThanOrEqual(20);
  });

  it('cameraLengthPlacing puts the spacing at the radius asked for (exact flat-detector geometry)', () => {
    for (const [kv, r] of [[80, 430], [200, 1600], [300, 420]] as const) {
      const cameraLengthPx = cameraLengthPlacing(kv * 1000, 1, r);
      expect(ringRadiusPx(1, { wavelengthA: electronWavelengthA(kv * 1000), cameraLengthPx })).toBeCloseTo(r, 9);
    }
  });

  it('axisAngleDifferenceDeg wraps axis directions into [-90, 90)', () => {
    expect(axisAngleDifferenceDeg(179, 1)).toBeCloseTo(-2, 12);
    expect(axisAngleDifferenceDeg(1, 179)).toBeCloseTo(2, 12);
    expect(axisAngleDifferenceDeg(100, 10)).toBeCloseTo(-90, 12);
  });
});

describe('accuracy benchmark, three small cases end to end', () => {
  // A round pattern behind a stop, arcs of a pattern centred outside the image, and a saturated direct beam.
  const ids = ['au-1k-standard', 'au-1k-outside', 'tin-1k-saturated'];
  const results: CaseEvaluation[] = [];

  for (const id of ids) {
    it(`${id}: centre, distortion, strong rings, d and phase meet the benchmark's targets`, () => {
      const r = evaluateCase(ACCURACY_CASES.find((c) => c.id === id)!, loadOpenCv());
      results.push(r);
      const fig = caseFigures(r);
      console.log(
        `${r.id}: centre ${r.centreErrorPx.toFixed(4)} px, q err ${r.axisRatioError.toExponential(1)}, strong rings ${fig.strongCount - fig.strongMissed}/${fig.strongCount}, ` +
          `median |dR| ${fig.strongRadiusMedianPx.toFixed(4)} px, max |d err| ${(fig.dMaxRelative * 1e6).toFixed(0)} ppm, top-1 ${r.top1Phase}`,
      );
      expect(r.status).toBe('ok');
      expect(r.centreErrorPx).toBeLessThanOrEqual(TARGETS.centreMedianPx);
      expect(r.axisRatioError).toBeLessThanOrEqual(TARGETS.axisRatioMedian);
      expect(fig.strongCount).toBeGreaterThanOrEqual(3);
      expect(fig.strongMissed).toBe(0);
      expect(fig.strongRadiusMedianPx).toBeLessThanOrEqual(TARGETS.strongRadiusMedianPx);
      expect(fig.dMaxRelative).toBeLessThanOrEqual(TARGETS.dRelative);
      expect(r.phaseCorrect).toBe(true);
      expect(fig.flags).toEqual([]);
    });
  }

  it('summarises them with every target met', () => {
    expect(results.length).toBe(ids.length);
    const s = summarise(results);
    for (const c of s.checks) expect(c.met, `${c.name}: ${c.measured}`).toBe(true);
  });
});
