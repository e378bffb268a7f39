import { describe, expect, it } from 'vitest';
import { maskSaturated } from '../../../../core/rings/mask-saturated';
import { countExcluded } from '../../../../core/rings/mask-combine';

function raster(width: number, height: number, fill: number) {
  return { width, height, data: new Float32Array(width * height).fill(fill) };
}

describe('maskSaturated', () => {
  it('marks 16-bit pixels at 65535 and their 8 neighbours (default margin 1 px)', () => {
    const r = raster(10, 10, 100);
    r.data[5 * 10 + 5] = 65535;
    r.data[0] = 65535;
    r.data[22] = 65534;
    const s = maskSaturated(r, { bitsPerSample: 16 });
    expect(s.saturationLevel).toBe(65535);
    expect(s.saturatedCount).toBe(2);
    expect(countExcluded(s.mask)).toBe(9 + 4);
    expect(s.mask.excluded[22]).toBe(0);
  });
  it('uses 2^(bits-1) - 1 for signed samples and a given level over the bits', () => {
    const r = raster(4, 4, 0);
    r.data[5] = 32767;
    expect(maskSaturated(r, { bitsPerSample: 16, sampleFormat: 'int', dilatePx: 0 }).saturatedCount).toBe(1);
    r.data[6] = 4000;
    expect(maskSaturated(r, { bitsPerSample: 16, saturationLevel: 4000, dilatePx: 0 }).saturatedCount).toBe(2);
  });
  it('refuses float data without a level and a bad bitsPerSample', () => {
    const r = raster(2, 2, 0);
    expect(() => maskSaturated(r, { bitsPerSample: 32, sampleFormat: 'float' })).toThrow(/give saturationLevel/);
    expect(() => maskSaturated(r, {})).toThrow(/bitsPerSample must be an integer/);
    expect(() => maskSaturated(r, { bitsPerSample: 8, dilatePx: -1 })).toThrow(/radiusPx/);
  });
});
