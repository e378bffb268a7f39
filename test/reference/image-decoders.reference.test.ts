/**
 * decodeImage against files written by encoders outside the project, pixel for pixel.
 *
 * test/fixtures/images/write-image-fixtures.py writes a synthetic ring pattern (seeded
 * noise, seed 20240611, 16-bit version spanning 0..65535) with tifffile, libtiff's tiffcp,
 * Pillow and pypng (Debian's python3-tifffile, libtiff-tools, python3-pil, python3-png) in
 * every variant Annula reads: 8/16/32-bit unsigned and signed integers, 32 and 64-bit
 * floats, gray/RGB/alpha/palette, both byte orders, strips and tiles, chunky and planar,
 * none/LZW/deflate (8 and 32946)/PackBits, predictors 2 and 3, multi-page, BigTIFF; PNG
 * 1 to 16 bits in every colour type, interlaced, with text chunks; JPEG gray and colour,
 * baseline and progressive. Each file was read back by an independent reader before its
 * expected samples were saved.
 *
 * Lossless files must match every Float32 bit pattern. JPEG files must match Pillow's own
 * decode (libjpeg) within 1 grey level at every pixel, since JPEG decoders differ slightly.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeImage, ImageDecodeError, type ImageInfo } from '../../core/image';
import { imageWritersAvailable, readFloat32, writeImageFixtures, type FixtureCase } from '../fixtures/images/image-fixtures';

const available = imageWritersAvailable();
if (!available) console.log('image reference tests skipped: apt-get install -y python3-tifffile python3-pil python3-png libtiff-tools');
const fixtures = available ? writeImageFixtures() : undefined;
const cases = fixtures?.cases ?? [];
afterAll(() => fixtures?.remove());

function read(file: string): Uint8Array {
  return new Uint8Array(readFileSync(join(fixtures!.dir, file)));
}

/** Indices and values of the first few pixels whose Float32 bit patterns differ. */
function bitMismatches(actual: Float32Array, expected: Float32Array): { count: number; first: string[] } {
  const a = new Uint32Array(actual.buffer, actual.byteOffset, actual.length);
  const e = new Uint32Array(expected.buffer, expected.byteOffset, expected.length);
  const first: string[] = [];
  let count = 0;
  for (let i = 0; i < e.length; i++) {
    if (a[i] !== e[i]) {
      if (count < 5) first.push(`#${i}: ${actual[i]} vs ${expected[i]}`);
      count++;
    }
  }
  return { count, first };
}

function title(c: FixtureCase): string {
  return `decodeImage(${c.file}${c.page ? `, { page: ${c.page} }` : ''})`;
}

describe.skipIf(!available)('decodeImage reads every pixel outside encoders wrote', () => {
  it(`the fixture script wrote the planned set of cases (seed ${fixtures?.seed})`, () => {
    expect(fixtures!.seed).toBe(20240611);
    expect(cases.filter((c) => c.expected && c.file.endsWith('.tif')).length).toBeGreaterThan(300);
    expect(cases.filter((c) => c.file.endsWith('.png')).length).toBeGreaterThanOrEqual(14);
    expect(cases.filter((c) => c.file.endsWith('.jpg') && c.expected).length).toBe(9);
  });

  for (const c of cases.filter((k) => k.expected !== undefined)) {
    it(`${title(c)} gives the ${c.width} x ${c.height} samples ${c.writer} wrote${c.compare === 'jpeg' ? ' (within 1 grey level of libjpeg)' : ', bit for bit'}`, () => {
      const { raster, info } = decodeImage(read(c.file), { page: c.page, name: c.file });
      expect([raster.width, raster.height]).toEqual([c.width, c.height]);
      const expected = readFloat32(join(fixtures!.dir, c.expected!));
      expect(raster.data.length).toBe(expected.length);
      if (c.compare === 'jpeg') {
        let worst = 0;
        let same = 0;
        for (let i = 0; i < expected.length; i++) {
          const d = Math.abs(raster.data[i]! - expected[i]!);
          worst = Math.max(worst, d);
          if (d === 0) same++;
        }
        console.log(`${c.file}: ${((100 * same) / expected.length).toFixed(1)}% of pixels identical to libjpeg's, largest difference ${worst.toFixed(3)}`);
        expect(worst).toBeLessThanOrEqual(1);
      } else {
        const { count, first } = bitMismatches(raster.data, expected);
        expect(count, first.join('; ')).toBe(0);
      }
      for (const [key, value] of Object.entries(c.info ?? {})) {
        expect(info[key as keyof ImageInfo], key).toEqual(value);
      }
    });
  }

  for (const c of cases.filter((k) => k.error !== undefined)) {
    it(`decodeImage(${c.file}) refuses with reason '${c.error!.reason}', naming the file and "${c.error!.message}"`, () => {
      let caught: unknown;
      try {
        decodeImage(read(c.file), { name: c.file });
      } catch (error) {
        caught = error;
      }
      expect(caught).toBeInstanceOf(ImageDecodeError);
      const e = caught as ImageDecodeError;
      expect(e.reason).toBe(c.error!.reason);
      expect(e.message.startsWith(`${c.file}: `)).toBe(true);
      expect(e.message).toContain(c.error!.message);
    });
  }

  it('decodeImage keeps the full 16-bit range: 0 and 65535 both come back from the uint16 TIFF and PNG', () => {
    for (const file of ['gray-u2-big-tiles-lzw-pred2.tif', 'png-gray-u2.png']) {
      const { data } = decodeImage(read(file)).raster;
      let lo = Infinity;
      let hi = -Infinity;
      for (const v of data) {
        lo = Math.min(lo, v);
        hi = Math.max(hi, v);
      }
      expect([file, lo, hi]).toEqual([file, 0, 65535]);
    }
  });

  it('decodeImage warns when it reduces RGB to luminance and when it drops alpha', () => {
    const rgb = decodeImage(read('rgb-u2-little-strips-none.tif')).info.warnings.join('\n');
    expect(rgb).toMatch(/0\.2126 R \+ 0\.7152 G \+ 0\.0722 B \(ITU-R BT\.709/);
    const rgba = decodeImage(read('png-rgba-u2.png')).info.warnings.join('\n');
    expect(rgba).toMatch(/alpha channel dropped/);
    const gray = decodeImage(read('gray-u2-little-strips-none.tif')).info.warnings;
    expect(gray).toEqual([]);
  });
});
