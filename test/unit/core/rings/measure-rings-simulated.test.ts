/**
 * measureRings on images from the project's simulator (core/simulate), whose truth
 * gives every ring's radius, width, counts, background and visible fraction: radius
 * accuracy against the photon-counting bound, texture and spottiness, over a small
 * spread of cases. The frame is given exactly, so this measures the ring step alone.
 */
import { describe, expect, it } from 'vitest';
import { findPhase, type Phase } from '../../../../core/crystal';
import { measureRings } from '../../../../core/rings/measure-rings';
import { radiusPrecisionBoundPx } from '../../../../core/rings/radius-precision-bound';
import { amorphousCarbonHalos, simulatePattern, type SimulationSpec, type SimulationTruth } from '../../../../core/simulate';

const AU = findPhase('Au')!;
const SI = findPhase('Si')!;

/** The beam stop of the truth, grown by 2 px, as a mask. */
function beamStopMask(truth: SimulationTruth) {
  const { widthPx: w, heightPx: h } = truth.image;
  const excluded = new Uint8Array(w * h);
  const stop = truth.beamStop!;
  const a = (stop.stemAngleDeg * Math.PI) / 180;
  for (let j = 0; j < h; j++) for (let i = 0; i < w; i++) {
    const dx = i - stop.centerXPx;
    const dy = j - stop.centerYPx;
    const along = dx * Math.cos(a) + dy * Math.sin(a);
    const across = -dx * Math.sin(a) + dy * Math.cos(a);
    if (dx * dx + dy * dy <= (stop.radiusPx + 2) ** 2 || (along >= 0 && Math.abs(across) <= stop.stemWidthPx / 2 + 2)) excluded[j * w + i] = 1;
  }
  return { width: w, height: h, excluded };
}

interface Case {
  label: string;
  phase: Phase;
  cameraLengthPx: number;
  ringFwhmPx: number;
  ringEta: number;
  halo: number;
  axisRatio: number;
  texture?: { shape: 'cosine'; amplitude: number; azimuthDeg: number };
  grainsPerRing?: number;
}

const cases: Case[] = [
  { label: 'Au, sharp rings', phase: AU, cameraLengthPx: 10_000, ringFwhmPx: 2, ringEta: 0.3, halo: 0, axisRatio: 1 },
  { label: 'Au, halo, 1.5 % ellipticity', phase: AU, cameraLengthPx: 10_000, ringFwhmPx: 3, ringEta: 0.5, halo: 80, axisRatio: 1.015 },
  { label: 'Au, long camera', phase: AU, cameraLengthPx: 14_000, ringFwhmPx: 2.5, ringEta: 0.4, halo: 40, axisRatio: 1.03 },
  { label: 'Si, halo', phase: SI, cameraLengthPx: 12_000, ringFwhmPx: 3, ringEta: 0.3, halo: 80, axisRatio: 1.01 },
  { label: 'Au, textured', phase: AU, cameraLengthPx: 11_000, ringFwhmPx: 2.5, ringEta: 0.4, halo: 40, axisRatio: 1, texture: { shape: 'cosine', amplitude: 0.35, azimuthDeg: 60 } },
  { label: 'Si, spotty (200 grains a ring)', phase: SI, cameraLengthPx: 12_000, ringFwhmPx: 2.5, ringEta: 0.3, halo: 0, axisRatio: 1, grainsPerRing: 200 },
];

describe('measureRings on simulated patterns with a known frame', () => {
  it('measures the strong rings to a median error <= 0.02 px, with honest uncertainties near the counting limit, and prints the table (seeds 301-306)', () => {
    const all: { err: number; z: number; overBound: number }[] = [];
    let missing = 0;
    let extra = 0;
    const lines: string[] = [];
    cases.forEach((c, index) => {
      const spec: SimulationSpec = {
        widthPx: 512,
        heightPx: 512,
        voltageV: 200e3,
        cameraLengthPx: c.cameraLengthPx,
        frame: { centerXPx: 251.3 + 0.17 * index, centerYPx: 262.8 - 0.29 * index, axisRatio: c.axisRatio, angleDeg: 25 + 30 * index },
        phases: [{ phase: c.phase, texture: c.texture ?? null, grainsPerRing: c.grainsPerRing ?? null }],
        peakCounts: 300,
        ringFwhmPx: c.ringFwhmPx,
        ringEta: c.ringEta,
        halos: c.halo > 0 ? amorphousCarbonHalos(c.halo) : [],
        beamStop: {},
        seed: 301 + index,
      };
      const { raster, truth } = simulatePattern(spec);
      // The detector: 1 ADU per electron, read noise 2 ADU, a 100 ADU pedestal (the simulator's defaults); the gain is estimated here.
      const res = measureRings(raster, beamStopMask(truth), truth.frame, { rMinPx: truth.beamStop!.radiusPx + 4 });
      const strong = truth.rings.filter((t) => t.visibleFraction >= 0.5 && t.peakCounts >= 40);
      const errs: number[] = [];
      for (const t of strong) {
        const m = res.rings.find((r) => Math.abs(r.radiusPx - t.radiusPx) < Math.max(1, t.fwhmPx / 2));
        if (!m) {
          missing++;
          continue;
        }
        // The photon-counting limit from the truth: the ring's visible counts, its own width, and what lies under it.
        const bound = radiusPrecisionBoundPx({
          radiusPx: t.radiusPx,
          fwhmPx: t.fwhmPx,
          eta: t.eta,
          ringCounts: t.totalCounts * t.visibleFraction,
          backgroundCountsPerPx: t.backgroundCounts + t.otherRingsCounts,
          visibleFraction: t.visibleFraction,
          readNoiseVarianceCounts2: 4,
        });
        const err = m.radiusPx - t.radiusPx;
        errs.push(Math.abs(err));
        all.push({ err, z: err / m.radiusSigmaPx, overBound: Math.abs(err) / bound });
        if (c.texture && t.peakCounts >= 100) {
          expect(Math.abs(m.textureAmplitude - c.texture.amplitude)).toBeLessThan(0.05);
          expect(Math.abs(m.textureAngleDeg! - c.texture.azimuthDeg)).toBeLessThan(5);
        }
        if (c.grainsPerRing) expect(m.spottiness).toBeGreaterThan(0.1);
        else if (!c.texture) expect(m.spottiness).toBeLessThan(0.05);
      }
      extra += res.rings.filter((r) => !truth.rings.some((t) => Math.abs(r.radiusPx - t.radiusPx) < Math.max(2, t.fwhmPx))).length;
      const sorted = [...errs].sort((a, b) => a - b);
      lines.push(`  ${c.label.padEnd(32)} ${String(errs.length).padStart(3)}/${String(strong.length).padEnd(3)} ${sorted[sorted.length >> 1]!.toFixed(4).padStart(9)} ${sorted[sorted.length - 1]!.toFixed(4).padStart(9)}`);
    });
    const quantile = (a: number[], q: number) => [...a].sort((x, y) => x - y)[Math.min(a.length - 1, Math.floor(q * a.length))]!;
    const absErr = all.map((a) => Math.abs(a.err));
    const rmsZ = Math.sqrt(all.reduce((s, a) => s + a.z * a.z, 0) / all.length);
    console.log('simulated patterns, strong rings (peak >= 40 counts, >= half visible), known frame');
    console.log('  case                             found  median|err|  max|err|');
    lines.forEach((l) => console.log(l));
    console.log(`  all: median |err| ${quantile(absErr, 0.5).toFixed(4)} px, p95 ${quantile(absErr, 0.95).toFixed(4)} px; |err|/bound median ${quantile(all.map((a) => a.overBound), 0.5).toFixed(2)}, p95 ${quantile(all.map((a) => a.overBound), 0.95).toFixed(2)}; rms(err/sigma) ${rmsZ.toFixed(2)}`);
    expect(missing).toBe(0);
    expect(extra).toBe(0);
    expect(quantile(absErr, 0.5)).toBeLessThanOrEqual(0.02);
    expect(quantile(absErr, 0.95)).toBeLessThanOrEqual(0.06);
    expect(rmsZ).toBeGreaterThan(0.6);
    expect(rmsZ).toBeLessThan(1.6);
    // An error's typical size against the counting limit: at it or a little above, never far below.
    expect(quantile(all.map((a) => a.overBound), 0.5)).toBeLessThan(2);
  });
});
