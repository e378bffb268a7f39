import { describe, expect, it } from 'vitest';
import { applyDetectorResponse, drawHotPixels, randomStream } from '../../../../core/simulate';

describe('applyDetectorResponse', () => {
  it('without noise gives round(offset + gain E), clipped to 0..65535, and counts the pixels clipped to 0', () => {
    const expected = Float32Array.from([0, 1.2, 10.25, 40000, 1e6, 3.5]);
    const out = new Float32Array(6);
    const low = applyDetectorResponse(expected, out, { gainAduPerElectron: 2, offsetAdu: 0.4, readNoiseAdu: 5, noise: false, output: 'uint16' }, randomStream(1), 6);
    // 0.4, 2.8, 20.9, 80000.4, 2000000.4, 7.4 -> rounded and clipped.
    expect(Array.from(out)).toEqual([0, 3, 21, 65535, 65535, 7]);
    expect(low).toBe(0);
  });

  it("'float32' output keeps offset + gain E unrounded and unclipped", () => {
    const expected = Float32Array.from([0.3, 70000]);
    const out = new Float32Array(2);
    applyDetectorResponse(expected, out, { gainAduPerElectron: 1.5, offsetAdu: 10, readNoiseAdu: 0, noise: false, output: 'float32' }, randomStream(1), 2);
    expect(out[0]).toBeCloseTo(10.45, 5);
    expect(out[1]).toBe(105010);
  });

  it('with noise, pixels of expected count 50 read offset + gain 50 on average with variance gain^2 50 + read^2 (seed 8, 200000 pixels)', () => {
    const n = 200_000;
    const expected = new Float32Array(n).fill(50);
    const out = new Float32Array(n);
    const gain = 3;
    const read = 4;
    applyDetectorResponse(expected, out, { gainAduPerElectron: gain, offsetAdu: 100, readNoiseAdu: read, noise: true, output: 'float32' }, randomStream(8), 1000);
    let s = 0;
    let s2 = 0;
    for (const v of out) {
      s += v;
      s2 += v * v;
    }
    const mean = s / n;
    const variance = s2 / n - mean * mean;
    const trueVariance = gain * gain * 50 + read * read;
    expect(Math.abs(mean - 250)).toBeLessThan(5 * Math.sqrt(trueVariance / n));
    // Variance of a sample variance of a near-normal variable: 2 sigma^4 / n.
    expect(Math.abs(variance - trueVariance)).toBeLessThan(5 * Math.sqrt((2 * trueVariance ** 2) / n));
  });

  it('clips noisy pixels below 0 ADU to 0 and reports how many (offset 0, read noise 3, expected 0, seed 2)', () => {
    const n = 10_000;
    const out = new Float32Array(n);
    const low = applyDetectorResponse(new Float32Array(n), out, { gainAduPerElectron: 1, offsetAdu: 0, readNoiseAdu: 3, noise: true, output: 'uint16' }, randomStream(2), 100);
    const zeros = out.filter((v) => v === 0).length;
    // round(3 z) < 0 for z < -1/6: P = 0.4338 (normal table, from memory); 0 ADU also from |3 z| < 1/2.
    expect(low / n).toBeGreaterThan(0.42);
    expect(low / n).toBeLessThan(0.45);
    expect(zeros).toBeGreaterThan(low);
    expect(Math.min(...out)).toBe(0);
  });
});

describe('drawHotPixels', () => {
  it('drawHotPixels(50, 64, 32, 20000, 60000, seed 4) gives 50 distinct pixels inside the image with integer values in range', () => {
    const hot = drawHotPixels(50, 64, 32, 20000, 60000, randomStream(4));
    expect(hot).toHaveLength(50);
    expect(new Set(hot.map((h) => h.yPx * 64 + h.xPx)).size).toBe(50);
    for (const h of hot) {
      expect(h.xPx >= 0 && h.xPx < 64 && h.yPx >= 0 && h.yPx < 32).toBe(true);
      expect(Number.isInteger(h.adu) && h.adu >= 20000 && h.adu <= 60000).toBe(true);
    }
    expect(drawHotPixels(50, 64, 32, 20000, 60000, randomStream(4))).toEqual(hot);
    expect(() => drawHotPixels(300, 64, 32, 0, 1, randomStream(4))).toThrow(/a tenth of the 2048 pixels/);
  });
});
