/**
 * A camera-sized image: a 4096 x 4096 16-bit TIFF (tifffile and libtiff's tiffcp, from
 * test/fixtures/images/write-large-tiff.py, noise seed 20240612) decodes to exactly the
 * samples numpy wrote, uncompressed, deflate and LZW.
 *
 * The decoding time is printed as a ratio to a plain pass that sums the same number of
 * 16-bit samples, both measured in this run (median of 3 after a warm-up). No timed
 * assertion: the ratio is for people reading the log.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeImage } from '../../core/image';
import { imageWritersAvailable } from '../fixtures/images/image-fixtures';
import { PYTHON } from './python-reference';

const SCRIPT = fileURLToPath(new URL('../fixtures/images/write-large-tiff.py', import.meta.url));
const N = 4096;
const available = imageWritersAvailable();
const dir = available ? mkdtempSync(join(tmpdir(), 'annula-large-tiff-')) : '';
if (available) execFileSync(PYTHON, [SCRIPT, dir], { stdio: ['ignore', 'ignore', 'inherit'] });
afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

function medianMs(run: () => void): number {
  run();
  const times: number[] = [];
  for (let k = 0; k < 3; k++) {
    const t0 = performance.now();
    run();
    times.push(performance.now() - t0);
  }
  return times.sort((a, b) => a - b)[1]!;
}

describe.skipIf(!available)('decodeImage on a 4096 x 4096 16-bit TIFF', () => {
  const raw = available ? readFileSync(join(dir, 'large.u16')) : Buffer.alloc(0);
  const expected = new Uint16Array(raw.buffer.slice(raw.byteOffset, raw.byteOffset + raw.byteLength));

  for (const variant of ['none', 'deflate', 'lzw']) {
    it(`decodeImage(large-${variant}.tif) gives all 16.8 million samples numpy wrote (time printed as a ratio to a plain summing pass)`, () => {
      const bytes = new Uint8Array(readFileSync(join(dir, `large-${variant}.tif`)));
      let decoded = decodeImage(bytes);
      const decodeMs = medianMs(() => {
        decoded = decodeImage(bytes);
      });
      let sink = 0;
      const plainMs = medianMs(() => {
        let sum = 0;
        for (let i = 0; i < expected.length; i++) sum += expected[i]!;
        sink += sum;
      });
      const { width, height, data } = decoded.raster;
      expect([width, height]).toEqual([N, N]);
      let mismatches = 0;
      for (let i = 0; i < expected.length; i++) if (data[i] !== expected[i]) mismatches++;
      expect(mismatches).toBe(0);
      expect(sink).toBeGreaterThan(0);
      console.log(
        `4096 x 4096 uint16 TIFF, ${variant} (${(bytes.length / 2 ** 20).toFixed(1)} MiB): decode ${decodeMs.toFixed(0)} ms = ` +
          `${(decodeMs / plainMs).toFixed(1)} x a plain pass summing the same ${expected.length} samples (${plainMs.toFixed(1)} ms)`,
      );
    });
  }
});
