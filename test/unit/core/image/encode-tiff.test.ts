/** encodeTiff (core/image/encode-tiff.ts), the writer of simulated images: layout, refusals, and a round trip through decodeImage. */
import { describe, expect, it } from 'vitest';
import { decodeImage } from '../../../../core/image';
import { encodeTiff, tiffRational } from '../../../../core/image/encode-tiff';

function gradient(width: number, height: number): Float32Array {
  return Float32Array.from({ length: width * height }, (_, i) => (i * 37) % 65536);
}

/** The IFD entries of a little-endian classic TIFF, read here from the bytes. */
function entries(bytes: Uint8Array): Map<number, { type: number; count: number; value: number }> {
  const view = new DataView(bytes.buffer, bytes.byteOffset);
  const ifd = view.getUint32(4, true);
  const n = view.getUint16(ifd, true);
  const out = new Map<number, { type: number; count: number; value: number }>();
  for (let k = 0; k < n; k++) {
    const at = ifd + 2 + 12 * k;
    const type = view.getUint16(at + 2, true);
    out.set(view.getUint16(at, true), { type, count: view.getUint32(at + 4, true), value: type === 3 ? view.getUint16(at + 8, true) : view.getUint32(at + 8, true) });
  }
  return out;
}

describe('encodeTiff', () => {
  it('writes "II", 42, one IFD in ascending tag order with the baseline fields, and no next IFD', () => {
    const bytes = encodeTiff({ width: 5, height: 3, data: gradient(5, 3) }, { description: 'hello' });
    expect([bytes[0], bytes[1], bytes[2], bytes[3]]).toEqual([0x49, 0x49, 42, 0]);
    const e = entries(bytes);
    const tags = [...e.keys()];
    expect(tags).toEqual([...tags].sort((a, b) => a - b));
    expect(tags).toEqual([256, 257, 258, 259, 262, 270, 273, 277, 278, 279, 282, 283, 296, 339]);
    expect(e.get(256)!.value).toBe(5);
    expect(e.get(257)!.value).toBe(3);
    expect(e.get(258)!.value).toBe(16);
    expect(e.get(259)!.value).toBe(1);
    expect(e.get(262)!.value).toBe(1);
    expect(e.get(339)!.value).toBe(1);
    expect(e.get(270)!.count).toBe(6);
    const view = new DataView(bytes.buffer);
    const ifd = view.getUint32(4, true);
    expect(view.getUint32(ifd + 2 + 12 * tags.length, true)).toBe(0);
    expect(bytes.length).toBe(e.get(273)!.value + 5 * 3 * 2);
  });

  it('round-trips uint16 and float32 rasters, description, software and resolution through decodeImage, in several strips', () => {
    const raster = { width: 37, height: 29, data: gradient(37, 29) };
    const bytes = encodeTiff(raster, { description: 'simulated {"a":1}', software: 'annula simulate', rowsPerStrip: 4, resolution: { xPerUnit: 5000 / 7, yPerUnit: 5000 / 7, unit: 'cm' } });
    const u16 = decodeImage(bytes);
    expect(u16.raster.data).toEqual(raster.data);
    expect(u16.info).toMatchObject({ format: 'tiff', bitsPerSample: 16, sampleFormat: 'uint', channels: 1, compression: 'none', layout: 'strips', byteOrder: 'little' });
    expect(u16.info.text.ImageDescription).toBe('simulated {"a":1}');
    expect(u16.info.text.Software).toBe('annula simulate');
    expect(u16.info.resolution).toEqual({ xPerUnit: 5000 / 7, yPerUnit: 5000 / 7, unit: 'cm' });
    expect(entries(bytes).get(273)!.count).toBe(8);
    const floats = { width: 4, height: 2, data: Float32Array.from([0.5, -3.25, 1e-7, 65535.5, 1e9, 0, 7, Math.PI]) };
    const f32 = decodeImage(encodeTiff(floats, { sampleFormat: 'float32' }));
    expect(f32.raster.data).toEqual(floats.data);
    expect(f32.info).toMatchObject({ bitsPerSample: 32, sampleFormat: 'float' });
  });

  it('refuses a uint16 sample that is not an integer from 0 to 65535, naming the pixel', () => {
    const data = gradient(4, 4);
    data[6] = 12.5;
    expect(() => encodeTiff({ width: 4, height: 4, data })).toThrow(/pixel \(2, 1\) = 12.5 is not an integer from 0 to 65535; round and clip the data first, or write sampleFormat 'float32'/);
    data[6] = 70000;
    expect(() => encodeTiff({ width: 4, height: 4, data })).toThrow(/pixel \(2, 1\) = 70000/);
  });

  it('refuses non-ASCII text, a bad size and a bad resolution', () => {
    const r = { width: 2, height: 2, data: new Float32Array(4) };
    expect(() => encodeTiff(r, { description: 'd = 2.355 Å' })).toThrow(/description \(ImageDescription\) must be 7-bit ASCII .* character 10 is U\+00C5/);
    expect(() => encodeTiff({ width: 3, height: 2, data: new Float32Array(4) })).toThrow(/raster data must hold width x height = 6 samples; got 4/);
    expect(() => encodeTiff({ width: 0, height: 2, data: new Float32Array(0) })).toThrow(/integers >= 1/);
    expect(() => encodeTiff(r, { resolution: { xPerUnit: -1, yPerUnit: 1, unit: 'cm' } })).toThrow(/resolution.xPerUnit must be a finite number > 0/);
  });
});

describe('tiffRational', () => {
  it('tiffRational(1 cm / 14 µm) is 5000/7, and any value is matched to 1e-12 relative with 32-bit terms', () => {
    expect(tiffRational(0.01 / 14e-6)).toEqual([5000, 7]);
    expect(tiffRational(72)).toEqual([72, 1]);
    for (const v of [Math.PI, 1 / 3, 123456.789, 2.5e-5, 4e9]) {
      const [n, d] = tiffRational(v);
      expect(n <= 0xffffffff && d <= 0xffffffff && n > 0 && d > 0).toBe(true);
      expect(Math.abs(n / d / v - 1)).toBeLessThan(1e-12);
    }
  });
});

describe('encodeTiff with deflate', () => {
  it('round-trips uint16 and float32 through decodeImage, with the predictor for uint16', () => {
    const width = 37;
    const height = 11;
    const data = Float32Array.from({ length: width * height }, (_, i) => (i * 7919) % 65536);
    const raster = { width, height, data };
    const u16 = decodeImage(encodeTiff(raster, { compression: 'deflate', rowsPerStrip: 4 }));
    expect(Array.from(u16.raster.data)).toEqual(Array.from(data));
    expect(u16.info.compression).toMatch(/deflate/i);
    const f = Float32Array.from({ length: width * height }, (_, i) => Math.sin(i) * 1e3);
    const f32 = decodeImage(encodeTiff({ width, height, data: f }, { compression: 'deflate', sampleFormat: 'float32' }));
    expect(Array.from(f32.raster.data)).toEqual(Array.from(f));
  });

  it('rejects an unknown compression by name', () => {
    expect(() => encodeTiff({ width: 1, height: 1, data: new Float32Array(1) }, { compression: 'lzw' as never })).toThrow(/compression must be 'none' or 'deflate'/);
  });
});
