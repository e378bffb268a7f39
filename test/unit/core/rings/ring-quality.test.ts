import { describe, expect, it } from 'vitest';
import { countingNoiseModel } from '../../../../core/rings/profile-noise-model';
import { ringQuality, type RingCells, type RingQualityOptions } from '../../../../core/rings/ring-quality';
import { gaussian, mulberry32 } from '../../../support/seeded-random';

const M = 90;
const azimuthRad = Float64Array.from({ length: M }, (_, k) => -Math.PI + ((k + 0.5) * 2 * Math.PI) / M);
const noise = countingNoiseModel(1);
const cellArea = 200;

/** Cells of a ring: background B plus net(phi), with the counting noise of a mean over `cellArea` pixels. */
function cells(net: (phi: number, k: number) => number, background: number, seed: number, area = (_k: number) => cellArea) {
  const rand = mulberry32(seed);
  const mean = new Float64Array(M);
  const a = new Float64Array(M);
  for (let k = 0; k < M; k++) {
    a[k] = area(k);
    const mu = background + net(azimuthRad[k]!, k);
    mean[k] = a[k]! > 0 ? mu + Math.sqrt(mu / a[k]!) * gaussian(rand) : Number.NaN;
  }
  return { azimuthRad, mean, area: a, fullCellAreaPx: cellArea };
}

const ringQualityOf = (c: Omit<RingCells, 'background'>, background: number, n = noise, o: RingQualityOptions = {}) => ringQuality({ ...c, background }, n, o);

describe('ringQuality', () => {
  it('gives a smooth, uniform ring continuity 1, spottiness 0 and texture near 0 (seed 51)', () => {
    const q = ringQualityOf(cells(() => 100, 50, 51), 50, noise);
    expect(q.continuity).toBe(1);
    expect(q.spottiness).toBe(0);
    expect(q.textureAmplitude).toBeLessThan(0.01);
    expect(q.visibleFraction).toBe(1);
    expect(q.reason).toBeNull();
  });

  it('measures a two-fold texture 1 + 0.3 cos 2(phi - 30 deg): amplitude 0.3 and angle 30 deg (seed 52)', () => {
    const phi0 = (30 * Math.PI) / 180;
    const q = ringQualityOf(cells((p) => 100 * (1 + 0.3 * Math.cos(2 * (p - phi0))), 50, 52), 50, noise);
    expect(Math.abs(q.textureAmplitude - 0.3)).toBeLessThan(0.01);
    expect(Math.abs(q.textureAngleDeg - 30)).toBeLessThan(1);
    // Smooth texture is not spottiness.
    expect(q.spottiness).toBe(0);
  });

  it('reads an angle past 90 degrees in [0, 180): 150 deg (seed 53)', () => {
    const phi0 = (150 * Math.PI) / 180;
    const q = ringQualityOf(cells((p) => 100 * (1 + 0.5 * Math.cos(2 * (p - phi0))), 50, 53), 50, noise);
    expect(Math.abs(q.textureAngleDeg - 150)).toBeLessThan(1);
  });

  it('finds a ring of few coarse grains spotty: relative scatter of the cells beyond counting noise (seed 54)', () => {
    // 25 grains at random azimuths, each a spot 2 cells wide; elsewhere nothing.
    const rand = mulberry32(540);
    const spots = Array.from({ length: 25 }, () => Math.floor(rand() * M));
    const netByCell = new Float64Array(M);
    for (const s of spots) {
      netByCell[s] += 180;
      netByCell[(s + 1) % M] += 180;
    }
    const q = ringQualityOf(cells((_p, k) => netByCell[k]!, 50, 54), 50, noise);
    // The cells' net intensity has mean 100 and, from the spots alone, a relative r.m.s. of about 1.
    let m = 0;
    let v = 0;
    for (let k = 0; k < M; k++) m += netByCell[k]! / M;
    for (let k = 0; k < M; k++) v += (netByCell[k]! - m) ** 2 / M;
    expect(q.spottiness).toBeGreaterThan(0.8 * (Math.sqrt(v) / m));
    expect(q.spottiness).toBeLessThan(1.1 * (Math.sqrt(v) / m));
    expect(q.continuity).toBeLessThan(0.7);
  });

  it('gives a weak smooth ring a continuity below 1: each cell is judged on its own counts (seed 55)', () => {
    // Net 1.2 counts/px on 50: per cell sigma = sqrt(51.2/200) = 0.51, so the ring stands 2.4 sigma a cell, under the 3-sigma rule.
    const q = ringQualityOf(cells(() => 1.2, 50, 55), 50, noise);
    expect(q.continuity).toBeLessThan(0.5);
    expect(q.spottiness).toBe(0);
  });

  it('counts only cells at least half visible, and measures no texture on less than half a ring', () => {
    const arc = cells(() => 100, 50, 56, (k) => (k < 30 ? cellArea : k < 35 ? 0.3 * cellArea : 0));
    const q = ringQualityOf(arc, 50);
    expect(q.cellsUsed).toBe(30);
    expect(q.visibleFraction).toBeCloseTo(30 / 90, 12);
    expect(q.continuity).toBe(1);
    expect(Number.isNaN(q.textureAmplitude)).toBe(true);
    expect(q.reason).toMatch(/texture not measured: only 33 % of the ring is visible/);
  });

  it('returns NaN figures with a reason for fewer than 8 visible cells or no net intensity', () => {
    const few = ringQualityOf(cells(() => 100, 50, 57, (k) => (k < 5 ? cellArea : 0)), 50, noise);
    expect(Number.isNaN(few.continuity)).toBe(true);
    expect(few.reason).toMatch(/only 5 azimuth cells/);
    const none = ringQualityOf(cells(() => 0, 50, 58), 60, noise);
    expect(none.reason).toMatch(/no positive mean intensity/);
  });

  it('refuses cells of different lengths and a non-finite background', () => {
    expect(() => ringQuality({ azimuthRad, mean: new Float64Array(3), area: new Float64Array(M), fullCellAreaPx: 1, background: 0 }, noise)).toThrow(/same length/);
    expect(() => ringQualityOf(cells(() => 1, 1, 1), Number.NaN)).toThrow(/cells.background must be finite/);
  });

  it('takes each cell\'s own expectation: cells that sample more of a sharp ring are not spots (seed 59)', () => {
    // Each cell's pixels sample the ring's radial profile differently: expected net 100 (1 + 0.2 u), u uniform in [-1, 1].
    const rand = mulberry32(590);
    const expectedNet = Float64Array.from({ length: M }, () => 100 * (1 + 0.2 * (2 * rand() - 1)));
    const c = cells((_p, k) => expectedNet[k]!, 50, 59);
    const without = ringQuality({ ...c, background: 50 }, noise);
    const withExpectation = ringQuality({ ...c, background: Float64Array.from({ length: M }, () => 50), expectedNet }, noise);
    expect(without.spottiness).toBeGreaterThan(0.08);
    expect(withExpectation.spottiness).toBe(0);
    expect(withExpectation.textureAmplitude).toBeLessThan(0.01);
  });
});
