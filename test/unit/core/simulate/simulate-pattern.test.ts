import { describe, expect, it } from 'vitest';
import { findPhase, predictRings } from '../../../../core/crystal';
import { ringRadiusPx } from '../../../../core/physics';
import { correctedAzimuthRad, correctedRadiusPx, frameTransform } from '../../../../core/rings/pattern-frame';
import { diffuseBackgroundCounts, simulatePattern, type SimulationSpec } from '../../../../core/simulate';
import { azimuthalProfile, fitRingCentre } from './ring-measurement';

const AU = findPhase('Au')!;
const SI = findPhase('Si')!;

/** A small noise-free, distorted, off-centre gold pattern: Au 111 at R = 128 px and 200 at 148 px inside the image, 220 and 311 cut by its edges. */
function baseSpec(overrides: Partial<SimulationSpec> = {}): SimulationSpec {
  return {
    widthPx: 340,
    heightPx: 330,
    voltageV: 200e3,
    cameraLengthPx: 12_000,
    frame: { centerXPx: 170.3, centerYPx: 163.6, axisRatio: 1.02, angleDeg: 35 },
    phases: [{ phase: AU }],
    peakCounts: 1000,
    ringFwhmPx: 2,
    ringEta: 0.5,
    directBeam: null,
    detector: { offsetAdu: 0, gainAduPerElectron: 1, readNoiseAdu: 0 },
    noise: false,
    output: 'float32',
    seed: 1,
    ...overrides,
  };
}

describe('simulatePattern: rings', () => {
  it('gives every ring its exact flat-detector radius ringRadiusPx(dA) and semi-axes R sqrt(q), R / sqrt(q)', () => {
    const { truth } = simulatePattern(baseSpec());
    expect(truth.rings.length).toBeGreaterThanOrEqual(3);
    const camera = { wavelengthA: truth.wavelengthA, cameraLengthPx: truth.cameraLengthPx };
    for (const r of truth.rings) {
      expect(r.radiusPx).toBe(ringRadiusPx(r.dA, camera));
      expect(r.semiMajorPx).toBeCloseTo(r.radiusPx * Math.sqrt(1.02), 10);
      expect(r.semiMinorPx).toBeCloseTo(r.radiusPx / Math.sqrt(1.02), 10);
      expect(Math.sqrt(r.semiMajorPx * r.semiMinorPx)).toBeCloseTo(r.radiusPx, 10);
    }
  });

  it('takes d, families and relative intensities from predictRings, the strongest ring at peakCounts', () => {
    const { truth } = simulatePattern(baseSpec());
    const predicted = predictRings(AU, { dMinA: truth.dMinA });
    expect(truth.rings.map((r) => r.dA)).toEqual(predicted.map((p) => p.dA));
    // (-0 written as 0: the truth is plain JSON.)
    expect(truth.rings.map((r) => r.families)).toEqual(predicted.map((p) => p.families.map((f) => f.hkl.map((v) => v + 0))));
    for (const r of truth.rings) expect(r.peakCounts).toBeCloseTo((1000 * r.relativeIntensity) / 100, 9);
    expect(Math.max(...truth.rings.map((r) => r.peakCounts))).toBe(1000);
  });

  it('simulates every ring that can reach the image and none beyond: the next ring lies past the farthest corner plus its extent', () => {
    const { truth } = simulatePattern(baseSpec());
    const t = frameTransform(truth.frame);
    const corner = Math.max(...[[-0.5, -0.5], [339.5, -0.5], [-0.5, 329.5], [339.5, 329.5]].map(([x, y]) => correctedRadiusPx(t, x!, y!)));
    const last = truth.rings[truth.rings.length - 1]!;
    expect(last.radiusPx - last.extentPx).toBeLessThan(corner);
    const next = predictRings(AU, { dMinA: 0.5 }).find((p) => p.dA < truth.dMinA)!;
    expect(ringRadiusPx(next.dA, truth) - 40).toBeGreaterThan(corner);
  });

  it('latticeScale 1.01 multiplies every d by 1.01; a second phase of weight 0.3 has its strongest ring at 0.3 peakCounts', () => {
    const { truth } = simulatePattern(baseSpec({ phases: [{ phase: AU, latticeScale: 1.01 }, { phase: SI, weight: 0.3 }] }));
    const au = truth.rings.filter((r) => r.phaseId === 'Au');
    const plain = predictRings(AU, { dMinA: 1 });
    for (const r of au) expect(r.dA / plain.find((p) => p.families[0]!.hkl.join() === r.hkl.join())!.dA).toBeCloseTo(1.01, 12);
    expect(truth.phases[0]!.cell.aA).toBeCloseTo(AU.cell.aA * 1.01, 12);
    expect(Math.max(...au.map((r) => r.peakCounts))).toBe(1000);
    const si = truth.rings.filter((r) => r.phaseId === 'Si');
    expect(si.length).toBeGreaterThan(0);
    expect(Math.max(...si.map((r) => r.peakCounts))).toBeCloseTo(300, 9);
    expect(truth.rings.map((r) => r.radiusPx)).toEqual([...truth.rings.map((r) => r.radiusPx)].sort((a, b) => a - b));
  });
});

describe('simulatePattern: the image against its truth', () => {
  it('the azimuthal mean of a noise-free distorted off-centre image, binned in the corrected frame, peaks at the truth radii (within 0.002 px)', () => {
    const { raster, truth } = simulatePattern(baseSpec());
    const inside = truth.rings.filter((r) => r.visibleFraction > 0.99);
    expect(inside.length).toBe(2);
    for (const r of inside) {
      const profile = azimuthalProfile(raster, truth.frame, r.radiusPx - 12, r.radiusPx + 12, 0.05);
      const fit = fitRingCentre(profile, r.radiusPx, r.fwhmPx, r.eta, 3 * r.fwhmPx);
      console.log(`Au ${r.hkl.join('')}: fitted ${fit.centrePx.toFixed(5)} px, truth ${r.radiusPx.toFixed(5)} px`);
      expect(Math.abs(fit.centrePx - r.radiusPx)).toBeLessThan(0.002);
    }
  });

  it('the s x s pixel-area sampling (default s = 3) moves a ring by far less than 0.01 px: under 0.001 px from s = 16 for FWHM 1 and 2 px', () => {
    for (const ringFwhmPx of [1, 2]) {
      const centres = [3, 16].map((supersampling) => {
        const { raster, truth } = simulatePattern(baseSpec({ ringFwhmPx, supersampling }));
        const r = truth.rings[0]!;
        return fitRingCentre(azimuthalProfile(raster, truth.frame, r.radiusPx - 8, r.radiusPx + 8, 0.05), r.radiusPx, ringFwhmPx, 0.5, 3 * ringFwhmPx).centrePx;
      });
      const bias = centres[0]! - centres[1]!;
      console.log(`FWHM ${ringFwhmPx} px: ring centre with s = 3 minus s = 16: ${bias.toExponential(2)} px`);
      expect(Math.abs(bias)).toBeLessThan(0.001);
    }
  });

  it('away from rings the noise-free image equals the diffuse background model (levelCounts at the strongest ring)', () => {
    const { raster, truth } = simulatePattern(baseSpec({ background: { levelCounts: 250, floorCounts: 12 } }));
    const t = frameTransform(truth.frame);
    const bg = truth.background!;
    expect(bg.levelCounts).toBe(250);
    expect(truth.referenceRadiusPx).toBe(truth.rings.find((r) => r.peakCounts === 1000)!.radiusPx);
    let checked = 0;
    for (let y = 0; y < raster.height; y += 7) {
      for (let x = 0; x < raster.width; x += 7) {
        const r = correctedRadiusPx(t, x, y);
        if (truth.rings.some((ring) => Math.abs(r - ring.radiusPx) < ring.extentPx + 2)) continue;
        const model = diffuseBackgroundCounts(bg, r, truth.referenceRadiusPx!);
        expect(Math.abs(raster.data[y * raster.width + x]! / model - 1)).toBeLessThan(2e-4);
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(100);
    const ring = truth.rings[0]!;
    expect(ring.backgroundCounts).toBeCloseTo(diffuseBackgroundCounts(bg, ring.radiusPx, truth.referenceRadiusPx!), 9);
  });

  it('a cosine texture (A = 0.6 at 20 degrees) adds the ring profile times A cos(2 (phi - 20 degrees)) to every pixel', () => {
    const plain = simulatePattern(baseSpec());
    const textured = simulatePattern(baseSpec({ phases: [{ phase: AU, texture: { shape: 'cosine', amplitude: 0.6, azimuthDeg: 20 } }] }));
    const ring = plain.truth.rings[0]!;
    const t = frameTransform(plain.truth.frame);
    let worst = 0;
    let checked = 0;
    for (let y = 0; y < 330; y++) {
      for (let x = 0; x < 340; x++) {
        const r = correctedRadiusPx(t, x, y);
        if (Math.abs(r - ring.radiusPx) > 0.3) continue;
        const phi = correctedAzimuthRad(t, x, y);
        const i = y * 340 + x;
        const ringPart = plain.raster.data[i]! - ring.backgroundCounts - ring.otherRingsCounts;
        const expected = ringPart * 0.6 * Math.cos(2 * (phi - (20 * Math.PI) / 180));
        worst = Math.max(worst, Math.abs(textured.raster.data[i]! - plain.raster.data[i]! - expected));
        checked++;
      }
    }
    console.log(`texture: worst pixel departure from ring x A cos(2 (phi - phi0)) on the ring: ${worst.toFixed(2)} counts of 1000 (${checked} pixels)`);
    expect(checked).toBeGreaterThan(400);
    expect(worst).toBeLessThan(0.002 * 1000);
  });

  it('spotty rings (30 grains per ring, seed 4) keep the ring mean, list 30 spots per ring whose weights sum to 30', () => {
    const plain = simulatePattern(baseSpec());
    const spotty = simulatePattern(baseSpec({ seed: 4, phases: [{ phase: AU, grainsPerRing: 30 }] }));
    for (const r of spotty.truth.rings) {
      expect(r.spots).toHaveLength(30);
      expect(r.spots!.reduce((s, x) => s + x.weight, 0)).toBeCloseTo(30, 9);
    }
    const ring = plain.truth.rings[0]!;
    const a = azimuthalProfile(plain.raster, plain.truth.frame, ring.radiusPx - 5, ring.radiusPx + 5, 1);
    const b = azimuthalProfile(spotty.raster, plain.truth.frame, ring.radiusPx - 5, ring.radiusPx + 5, 1);
    const areaA = a.mean.reduce((s, v) => s + v, 0);
    const areaB = b.mean.reduce((s, v) => s + v, 0);
    console.log(`spotty / smooth ring area over ±5 px: ${(areaB / areaA).toFixed(5)}`);
    expect(Math.abs(areaB / areaA - 1)).toBeLessThan(0.01);
    // Spots: the brightest pixel on the ring is far above the smooth ring's.
    const peak = (d: Float32Array): number => Math.max(...d);
    expect(peak(spotty.raster.data)).toBeGreaterThan(3 * peak(plain.raster.data));
  });
});

describe('simulatePattern: beam stop, direct beam, saturation and hot pixels', () => {
  const stopped = simulatePattern(
    baseSpec({
      frame: { centerXPx: 170, centerYPx: 165, axisRatio: 1, angleDeg: 0 },
      output: 'uint16',
      detector: { offsetAdu: 100, gainAduPerElectron: 1, readNoiseAdu: 0 },
      directBeam: { peakCounts: 1e6, fwhmPx: 6 },
      beamStop: { radiusPx: 30, stemAngleDeg: 90, stemWidthPx: 16, transmission: 0.01 },
      hotPixels: { count: 12 },
    }),
  );

  it('records the stop it used and dims what it covers to its transmission', () => {
    const { raster, truth } = stopped;
    expect(truth.beamStop).toEqual({ centerXPx: 170, centerYPx: 165, radiusPx: 30, stemAngleDeg: 90, stemWidthPx: 16, transmission: 0.01 });
    const open = simulatePattern(baseSpec({ frame: truth.frame, output: 'float32', detector: { offsetAdu: 0 }, directBeam: { peakCounts: 1e6, fwhmPx: 6 } }));
    // In the stem, on the first ring (below the centre, y = 165 + R).
    const y = Math.round(165 + truth.rings[0]!.radiusPx);
    const i = y * 340 + 170;
    expect(raster.data[i]!).toBe(Math.round(100 + 0.01 * open.raster.data[i]!));
  });

  it('lets the direct beam saturate where the stop leaves it, and lists no saturated pixel under the stop', () => {
    const { truth } = stopped;
    expect(truth.saturated.pixelCount).toBe(0);
    const bare = simulatePattern(baseSpec({ output: 'uint16', directBeam: { peakCounts: 1e6, fwhmPx: 6 }, detector: { offsetAdu: 100 } }));
    const { pixelCount, runs, runsComplete } = bare.truth.saturated;
    expect(pixelCount).toBeGreaterThan(20);
    expect(runsComplete).toBe(true);
    expect(runs.reduce((s, [, a, b]) => s + b - a + 1, 0)).toBe(pixelCount);
    let atFullScale = 0;
    for (const v of bare.raster.data) if (v === 65535) atFullScale++;
    expect(atFullScale).toBe(pixelCount);
    for (const [y, a, b] of runs) for (let x = a; x <= b; x++) expect(bare.raster.data[y * 340 + x]).toBe(65535);
  });

  it('visibleFraction of a ring crossed by the stem is 1 - 2 asin(w / 2R) / (2 pi)', () => {
    for (const r of stopped.truth.rings.filter((x) => x.visibleFraction > 0.9)) {
      expect(r.visibleFraction).toBeCloseTo(1 - (2 * Math.asin(16 / (2 * r.radiusPx))) / (2 * Math.PI), 3);
    }
  });

  it('places the hot pixels listed in the truth, with their values', () => {
    const { raster, truth } = stopped;
    expect(truth.hotPixels).toHaveLength(12);
    for (const h of truth.hotPixels) expect(raster.data[h.yPx * 340 + h.xPx]).toBe(h.adu);
  });
});

describe('simulatePattern: noise, seeds, truth', () => {
  it('noisy pixels scatter about the expected image with the variance of Poisson counts plus read noise (gain 2, read 3 ADU, seed 9)', () => {
    const expected = simulatePattern(baseSpec({ detector: { gainAduPerElectron: 2, offsetAdu: 50, readNoiseAdu: 3 } }));
    const noisy = simulatePattern(baseSpec({ noise: true, seed: 9, detector: { gainAduPerElectron: 2, offsetAdu: 50, readNoiseAdu: 3 } }));
    let chi2 = 0;
    const n = expected.raster.data.length;
    for (let i = 0; i < n; i++) {
      const e = expected.raster.data[i]!;
      const electrons = (e - 50) / 2;
      chi2 += (noisy.raster.data[i]! - e) ** 2 / (4 * electrons + 9);
    }
    // chi-square of n standard normal-ish terms: mean n, sd sqrt(2n) (plus the excess kurtosis of Poisson counts, small here).
    console.log(`noise chi-square / pixels = ${(chi2 / n).toFixed(4)}`);
    expect(Math.abs(chi2 - n)).toBeLessThan(5 * Math.sqrt(2 * n));
  });

  it('the same spec gives the same image bit for bit; another seed another noise', () => {
    const spec = baseSpec({ noise: true, output: 'uint16', hotPixels: { count: 5 }, phases: [{ phase: AU, grainsPerRing: 20 }] });
    const a = simulatePattern(spec);
    const b = simulatePattern(spec);
    expect(b.raster.data).toEqual(a.raster.data);
    expect(b.truth).toEqual(a.truth);
    const c = simulatePattern({ ...spec, seed: 2 });
    expect(c.raster.data).not.toEqual(a.raster.data);
    expect(c.truth.hotPixels).not.toEqual(a.truth.hotPixels);
  });

  it('the truth survives a JSON round trip unchanged (no NaN, no Infinity, no undefined)', () => {
    const { truth } = simulatePattern(baseSpec({ beamStop: {}, hotPixels: { count: 3 }, halos: [{ dA: 2.1, fwhmPerA: 0.12, peakCounts: 80 }], scenario: 'an invented film' }));
    expect(JSON.parse(JSON.stringify(truth))).toEqual(truth);
    expect(truth.format).toBe('annula-simulation-truth');
    expect(truth.scenario).toBe('an invented film');
  });

  it('a centre outside the image leaves arcs whose azimuthal mean still peaks at the truth radius', () => {
    const { raster, truth } = simulatePattern(baseSpec({ frame: { centerXPx: -60, centerYPx: 140, axisRatio: 1.01, angleDeg: 100 } }));
    const ring = truth.rings.find((r) => r.peakCounts === 1000)!;
    expect(ring.visibleFraction).toBeGreaterThan(0.1);
    expect(ring.visibleFraction).toBeLessThan(0.5);
    const fit = fitRingCentre(azimuthalProfile(raster, truth.frame, ring.radiusPx - 12, ring.radiusPx + 12, 0.05), ring.radiusPx, 2, 0.5, 6);
    expect(Math.abs(fit.centrePx - ring.radiusPx)).toBeLessThan(0.005);
  });

  it('a centre 3000 px from the image tabulates only the radii the image covers and still puts the arc at the truth radius', () => {
    const spec = baseSpec({ widthPx: 200, heightPx: 150, cameraLengthPx: 291_000, frame: { centerXPx: -3000, centerYPx: 60, axisRatio: 1.01, angleDeg: 10 } });
    const { raster, truth } = simulatePattern(spec);
    const seen = truth.rings.filter((r) => r.visibleFraction > 0);
    expect(seen.length).toBeGreaterThan(0);
    const ring = seen[0]!;
    expect(ring.radiusPx).toBeGreaterThan(3000);
    const fit = fitRingCentre(azimuthalProfile(raster, truth.frame, ring.radiusPx - 12, ring.radiusPx + 12, 0.05), ring.radiusPx, 2, 0.5, 6);
    expect(Math.abs(fit.centrePx - ring.radiusPx)).toBeLessThan(0.005);
    // The table starts about a pixel inside the nearest point of the image, not at the centre.
    const t = frameTransform(truth.frame);
    let nearest = Infinity;
    for (let y = 0; y < 150; y++) nearest = Math.min(nearest, correctedRadiusPx(t, 0, y));
    expect(truth.radialTableStartPx).toBeLessThan(nearest - 1);
    expect(truth.radialTableStartPx).toBeGreaterThan(nearest - 3);
  });

  it('reports progress from 0 to 1 in increasing steps', () => {
    const seen: number[] = [];
    simulatePattern(baseSpec({ noise: true }), { onProgress: (f) => seen.push(f) });
    expect(seen[seen.length - 1]).toBe(1);
    for (let i = 1; i < seen.length; i++) expect(seen[i]!).toBeGreaterThanOrEqual(seen[i - 1]!);
    expect(seen.length).toBeGreaterThan(5);
  });
});
