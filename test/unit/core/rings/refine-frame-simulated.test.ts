/**
 * The whole geometry stage on images from the project's simulator (core/simulate):
 * masks found by maskSaturated, maskHotPixels and maskBeamStop (not taken from the
 * truth), then refineFrame from its own first estimate. The truth gives the exact
 * centre and distortion; a seeded set of cases spans a beam stop over the centre,
 * a centre outside the image (arcs only), q = 1.00 to 1.03, texture, spotty rings,
 * amorphous halos, hot pixels and low counts. Prints the table; asserts bounds that
 * hold with margin over what was measured (issue 3 section 5 targets: centre median
 * <= 0.05 px, p95 <= 0.2 px; axis-ratio median <= 0.0005). Measured when written:
 * centre median 0.0062 px, max 0.039 px (the arcs-only case); |q err| median 6.6e-5
 * (good cases), at most 3.6e-4 (low counts).
 */
import { describe, expect, it } from 'vitest';
import { loadOpenCv } from '../../../../app/node/load-opencv';
import { findPhase } from '../../../../core/crystal';
import { combineMasks } from '../../../../core/rings/mask-combine';
import { maskBeamStop } from '../../../../core/rings/mask-beam-stop';
import { maskHotPixels } from '../../../../core/rings/mask-hot-pixels';
import { maskSaturated } from '../../../../core/rings/mask-saturated';
import { refineFrame } from '../../../../core/rings/refine-frame';
import { amorphousCarbonHalos, simulatePattern, type SimulationSpec } from '../../../../core/simulate';

const cv = loadOpenCv();
const AU = findPhase('Au')!;
const SI = findPhase('Si')!;

interface Case { label: string; spec: Omit<SimulationSpec, 'seed' | 'voltageV' | 'ringEta'> & { voltageV?: number } }

const S = 768;
const cases: Case[] = [
  { label: 'Au, stop over centre, q 1.000', spec: { widthPx: S, heightPx: S, cameraLengthPx: 10_000, frame: { centerXPx: 380.3, centerYPx: 390.7, axisRatio: 1, angleDeg: 0 }, phases: [{ phase: AU }], peakCounts: 300, ringFwhmPx: 3, beamStop: {} } },
  { label: 'Au, stop over centre, q 1.010', spec: { widthPx: S, heightPx: S, cameraLengthPx: 10_000, frame: { centerXPx: 391.6, centerYPx: 377.2, axisRatio: 1.01, angleDeg: 35 }, phases: [{ phase: AU }], peakCounts: 300, ringFwhmPx: 3, beamStop: { stemAngleDeg: 200 } } },
  { label: 'Au, halo, q 1.030', spec: { widthPx: S, heightPx: S, cameraLengthPx: 9_000, frame: { centerXPx: 370.1, centerYPx: 395.4, axisRatio: 1.03, angleDeg: 120 }, phases: [{ phase: AU }], peakCounts: 250, ringFwhmPx: 3, halos: amorphousCarbonHalos(80), beamStop: {} } },
  { label: 'Si, texture, q 1.020', spec: { widthPx: S, heightPx: S, cameraLengthPx: 11_000, frame: { centerXPx: 385.9, centerYPx: 380.5, axisRatio: 1.02, angleDeg: 160 }, phases: [{ phase: SI, texture: { shape: 'cosine', amplitude: 0.4, azimuthDeg: 50 } }], peakCounts: 300, ringFwhmPx: 2.5, beamStop: { stemAngleDeg: 0 } } },
  { label: 'Si, spotty (300 grains), q 1.015', spec: { widthPx: S, heightPx: S, cameraLengthPx: 11_000, frame: { centerXPx: 377.7, centerYPx: 386.1, axisRatio: 1.015, angleDeg: 75 }, phases: [{ phase: SI, grainsPerRing: 300 }], peakCounts: 300, ringFwhmPx: 2.5, beamStop: {} } },
  { label: 'Au, centre outside, arcs, q 1.010', spec: { widthPx: S, heightPx: S, cameraLengthPx: 16_000, frame: { centerXPx: -110.4, centerYPx: 300.8, axisRatio: 1.01, angleDeg: 20 }, phases: [{ phase: AU }], peakCounts: 300, ringFwhmPx: 3, beamStop: null, directBeam: null } },
  { label: 'Au, off-centre, stop, q 1.005', spec: { widthPx: S, heightPx: S, cameraLengthPx: 12_000, frame: { centerXPx: 190.2, centerYPx: 210.9, axisRatio: 1.005, angleDeg: 95 }, phases: [{ phase: AU }], peakCounts: 300, ringFwhmPx: 3, beamStop: { stemAngleDeg: 225 } } },
  { label: 'Au, low counts (40), q 1.020', spec: { widthPx: S, heightPx: S, cameraLengthPx: 10_000, frame: { centerXPx: 384.4, centerYPx: 383.3, axisRatio: 1.02, angleDeg: 60 }, phases: [{ phase: AU }], peakCounts: 40, ringFwhmPx: 3, beamStop: {} } },
  { label: 'Au, hot pixels, q 1.025, 300 kV', spec: { widthPx: S, heightPx: S, voltageV: 300e3, cameraLengthPx: 13_000, frame: { centerXPx: 388.8, centerYPx: 379.9, axisRatio: 1.025, angleDeg: 140 }, phases: [{ phase: AU }], peakCounts: 300, ringFwhmPx: 3.5, hotPixels: { count: 300 }, beamStop: {} } },
  { label: 'Si, halo, q 1.000, 80 kV', spec: { widthPx: S, heightPx: S, voltageV: 80e3, cameraLengthPx: 5_500, frame: { centerXPx: 381.5, centerYPx: 389.2, axisRatio: 1, angleDeg: 0 }, phases: [{ phase: SI }], peakCounts: 250, ringFwhmPx: 3, halos: amorphousCarbonHalos(60), beamStop: {} } },
];

describe('refineFrame on simulated patterns (masks and first estimate found, not given)', () => {
  it('recovers centre and distortion of 10 seeded cases and prints the table (seeds 401-410)', () => {
    const rows: Array<{ label: string; centre: number; q: number; angle: number; zc: number; good: boolean }> = [];
    cases.forEach((c, k) => {
      const spec: SimulationSpec = { voltageV: 200e3, ringEta: 0.4, ...c.spec, seed: 401 + k };
      const { raster, truth } = simulatePattern(spec);
      const saturated = maskSaturated(raster, { bitsPerSample: 16 });
      const stop = maskBeamStop(raster, cv);
      const hot = maskHotPixels(raster, saturated.mask);
      const mask = combineMasks(saturated.mask, stop.mask, hot.mask);
      if (truth.beamStop) expect(stop.found).toBe(true);
      for (const p of truth.hotPixels) expect(mask.excluded[p.yPx * S + p.xPx]).toBe(1);
      const r = refineFrame(raster, mask, {}, cv);
      if (!r.ok) throw new Error(`${c.label}: ${r.reason}`);
      const dx = r.frame.centerXPx - truth.frame.centerXPx;
      const dy = r.frame.centerYPx - truth.frame.centerYPx;
      const dAngle = truth.frame.axisRatio > 1 ? ((r.frame.angleDeg - truth.frame.angleDeg + 270) % 180) - 90 : NaN;
      rows.push({
        label: c.label,
        centre: Math.hypot(dx, dy),
        q: r.frame.axisRatio - truth.frame.axisRatio,
        angle: dAngle,
        zc: Math.hypot(dx / r.sigma.centerXPx, dy / r.sigma.centerYPx) / Math.SQRT2,
        good: !c.label.includes('outside') && !c.label.includes('low counts'),
      });
    });
    const q = (a: number[], p: number) => [...a].sort((x, y) => x - y)[Math.min(a.length - 1, Math.floor(p * a.length))]!;
    console.log('refineFrame on simulated 768 x 768 patterns');
    console.log('  case                               |centre err| px   q err      angle err deg   centre err / sigma');
    for (const r of rows) console.log(`  ${r.label.padEnd(36)} ${r.centre.toFixed(4).padStart(8)}   ${r.q.toExponential(2).padStart(10)}   ${Number.isNaN(r.angle) ? '     -' : r.angle.toFixed(3).padStart(6)}   ${r.zc.toFixed(2).padStart(6)}`);
    const centre = rows.map((r) => r.centre);
    const qGood = rows.filter((r) => r.good).map((r) => Math.abs(r.q));
    console.log(`  centre error median ${q(centre, 0.5).toFixed(4)} px, max ${q(centre, 1).toFixed(4)} px; |q err| median (good cases) ${q(qGood, 0.5).toExponential(2)}`);
    expect(q(centre, 0.5)).toBeLessThanOrEqual(0.02);
    expect(q(centre, 1)).toBeLessThanOrEqual(0.1);
    expect(q(qGood, 0.5)).toBeLessThanOrEqual(0.0003);
    expect(q(rows.map((r) => Math.abs(r.q)), 1)).toBeLessThanOrEqual(0.001);
    // Uncertainties are honest: the centre errors are a few sigma at most.
    expect(q(rows.map((r) => r.zc), 0.5)).toBeLessThan(2.5);
  });
});

describe('refineFrame on a 2048 x 2048 simulated pattern', () => {
  it('reports its time in plain passes over the pixels and stays accurate (seed 420)', () => {
    const { raster, truth } = simulatePattern({
      widthPx: 2048, heightPx: 2048, voltageV: 200e3, cameraLengthPx: 24_000,
      frame: { centerXPx: 1019.6, centerYPx: 1031.3, axisRatio: 1.015, angleDeg: 30 },
      phases: [{ phase: AU }], peakCounts: 300, ringFwhmPx: 4, ringEta: 0.4, beamStop: {}, supersampling: 1, seed: 420,
    });
    const plainPass = () => { let s = 0; const d = raster.data; for (let p = 0; p < d.length; p++) s += d[p]!; return s; };
    plainPass();
    let t = performance.now();
    for (let k = 0; k < 5; k++) plainPass();
    const plainMs = (performance.now() - t) / 5;
    t = performance.now();
    const stop = maskBeamStop(raster, cv);
    const masksMs = performance.now() - t;
    t = performance.now();
    const r = refineFrame(raster, stop.mask, {}, cv);
    const refineMs = performance.now() - t;
    if (!r.ok) throw new Error(r.reason);
    console.log(`2048 x 2048: beam-stop mask ${(masksMs / plainMs).toFixed(0)} plain passes, refineFrame ${(refineMs / plainMs).toFixed(0)} plain passes (${r.iterations} rounds, ${r.rings.length} rings); plain pass ${plainMs.toFixed(1)} ms here`);
    expect(Math.hypot(r.frame.centerXPx - truth.frame.centerXPx, r.frame.centerYPx - truth.frame.centerYPx)).toBeLessThan(0.05);
    expect(Math.abs(r.frame.axisRatio - 1.015)).toBeLessThan(0.0003);
  });
});
