import { describe, expect, it } from 'vitest';
import { findPhase } from '../../../../core/crystal';
import { electronWavelengthA, ringRadiusPx } from '../../../../core/physics';
import { resolveSimulationSpec, simulatePattern, type SimulationSpec } from '../../../../core/simulate';

const AU = findPhase('Au')!;
const good: SimulationSpec = {
  widthPx: 64,
  heightPx: 48,
  voltageV: 200e3,
  cameraLengthPx: 10_000,
  frame: { centerXPx: 30, centerYPx: 20, axisRatio: 1, angleDeg: 0 },
  phases: [{ phase: AU }],
  peakCounts: 500,
  ringFwhmPx: 2,
  seed: 3,
};

describe('resolveSimulationSpec', () => {
  it('fills in the documented defaults', () => {
    const r = resolveSimulationSpec({ ...good, beamStop: {}, hotPixels: { count: 2 } });
    expect(r.ringEta).toBe(0.5);
    expect(r.supersampling).toBe(3);
    expect(r.noise).toBe(true);
    expect(r.output).toBe('uint16');
    expect(r.detector).toEqual({ gainAduPerElectron: 1, offsetAdu: 100, readNoiseAdu: 2 });
    expect(r.directBeam).toEqual({ peakCounts: 1e6, fwhmPx: 8 });
    expect(r.background).toEqual({
      levelCounts: 100,
      scaleRadiusPx: ringRadiusPx(10, { wavelengthA: electronWavelengthA(200e3), cameraLengthPx: 10_000 }),
      exponent: 2,
      floorCounts: 0,
    });
    expect(r.beamStop).toEqual({ centerXPx: 30, centerYPx: 20, radiusPx: 6, stemAngleDeg: 90, stemWidthPx: 6, transmission: 0.002 });
    expect(r.hotPixels).toEqual({ count: 2, minAdu: 20000, maxAdu: 60000 });
    expect(r.phases[0]).toMatchObject({ weight: 1, latticeScale: 1, texture: null, grainsPerRing: null, spotFwhmPx: 2 });
    expect(r.scenario).toBe('');
    expect(resolveSimulationSpec({ ...good, background: null, directBeam: null }).background).toBeNull();
  });

  const bad: [string, Partial<SimulationSpec> | ((s: SimulationSpec) => SimulationSpec), RegExp][] = [
    ['widthPx 0', { widthPx: 0 }, /widthPx must be an integer from 1 to 16384; got 0/],
    ['heightPx 20000', { heightPx: 20000 }, /heightPx must be an integer from 1 to 16384; got 20000/],
    ['voltageV -1', { voltageV: -1 }, /voltageV must be a finite number > 0 V; got -1/],
    ['cameraLengthPx NaN', { cameraLengthPx: Number.NaN }, /cameraLengthPx must be a finite number > 0 px; got NaN/],
    ['axisRatio 0.9', { frame: { centerXPx: 0, centerYPx: 0, axisRatio: 0.9, angleDeg: 0 } }, /axisRatio must be a finite number >= 1/],
    ['ringFwhmPx -1', { ringFwhmPx: -1 }, /ringFwhmPx must be >= 0.5 px .*; got -1/],
    ['ringEta 2', { ringEta: 2 }, /ringEta must lie in \[0, 1\]/],
    ['peakCounts 0', { peakCounts: 0 }, /peakCounts must be a finite number > 0/],
    ['no phases', { phases: [] }, /phases must list at least one phase; got an empty list/],
    ['weight -2', { phases: [{ phase: AU, weight: -2 }] }, /phases\[0\]\.weight must be a finite number > 0; got -2/],
    ['latticeScale 0', { phases: [{ phase: AU }, { phase: AU, latticeScale: 0 }] }, /phases\[1\]\.latticeScale must be a finite number > 0; got 0/],
    ['grainsPerRing 2.5', { phases: [{ phase: AU, grainsPerRing: 2.5 }] }, /phases\[0\]\.grainsPerRing must be an integer from 1 to 1000000; got 2.5/],
    ['texture amplitude 3', { phases: [{ phase: AU, texture: { shape: 'cosine', amplitude: 3, azimuthDeg: 0 } }] }, /phases\[0\]\.texture\.amplitude must lie in \[0, 1\]; got 3/],
    ['dMinA 0.1', { dMinA: 0.1 }, /dMinA must be >= 0.25 Å/],
    ['halo dA 0', { halos: [{ dA: 0, fwhmPerA: 0.1, peakCounts: 1 }] }, /halos\[0\]\.dA must be > 0 Å; got 0/],
    ['beam stop transmission 1.5', { beamStop: { transmission: 1.5 } }, /beamStop.transmission must lie in \[0, 1\)/],
    ['hot pixels 1000', { hotPixels: { count: 1000 } }, /hotPixels.count must be an integer from 0 to 307; got 1000/],
    ['hot pixel range', { hotPixels: { count: 1, minAdu: 500, maxAdu: 100 } }, /hotPixels.maxAdu must be an integer from 500 to 65535; got 100/],
    ['gain 0', { detector: { gainAduPerElectron: 0 } }, /detector.gainAduPerElectron must be a finite number > 0 ADU per electron; got 0/],
    ['read noise -1', { detector: { readNoiseAdu: -1 } }, /detector.readNoiseAdu must be a finite number >= 0 ADU; got -1/],
    ['supersampling 17', { supersampling: 17 }, /supersampling must be an integer from 1 to 16; got 17/],
    ['output png', { output: 'png' as 'uint16' }, /output must be 'uint16' or 'float32'; got "png"/],
    ['seed -4', { seed: -4 }, /seed must be an integer from 0 to 4294967295; got -4/],
  ];
  for (const [what, change, message] of bad) {
    it(`refuses ${what} with a message naming the field`, () => {
      const spec = typeof change === 'function' ? change(good) : { ...good, ...change };
      expect(() => resolveSimulationSpec(spec)).toThrow(message);
      expect(() => simulatePattern(spec)).toThrow(message);
    });
  }
});
