import { describe, expect, it } from 'vitest';
import { beamStopCovers, beamStopPixelClass, beamStopShape, checkBeamStop, randomStream } from '../../../../core/simulate';

const stop = { centerXPx: 100.3, centerYPx: 90.7, radiusPx: 20, stemAngleDeg: 60, stemWidthPx: 12, transmission: 0.01 };
const shape = beamStopShape(stop);

describe('beamStopCovers', () => {
  it('covers the disc and a strip along the stem direction to any distance, and nothing behind the disc', () => {
    expect(beamStopCovers(shape, 100.3 + 19.9, 90.7)).toBe(true);
    expect(beamStopCovers(shape, 100.3 - 20.1, 90.7)).toBe(false);
    const c = Math.cos(Math.PI / 3);
    const s = Math.sin(Math.PI / 3);
    for (const along of [25, 300, 5000]) {
      expect(beamStopCovers(shape, 100.3 + along * c - 5.9 * s, 90.7 + along * s + 5.9 * c)).toBe(true);
      expect(beamStopCovers(shape, 100.3 + along * c + 6.1 * s, 90.7 + along * s - 6.1 * c)).toBe(false);
      expect(beamStopCovers(shape, 100.3 - along * c, 90.7 - along * s)).toBe(false);
    }
  });

  it('beamStopPixelClass agrees with covers() at 400 points in each of 5000 random pixels (seed 77)', () => {
    const r = randomStream(77);
    let mismatches = 0;
    const seen = { clear: 0, covered: 0, edge: 0 };
    for (let n = 0; n < 5000; n++) {
      const x = Math.floor(40 + 160 * r.uniform());
      const y = Math.floor(40 + 160 * r.uniform());
      const cls = beamStopPixelClass(shape, x, y);
      seen[cls]++;
      let covered = 0;
      for (let a = 0; a < 20; a++) for (let b = 0; b < 20; b++) if (beamStopCovers(shape, x - 0.5 + (a + 0.5) / 20, y - 0.5 + (b + 0.5) / 20)) covered++;
      if ((cls === 'clear' && covered > 0) || (cls === 'covered' && covered < 400)) mismatches++;
    }
    expect(mismatches).toBe(0);
    expect(seen.clear).toBeGreaterThan(0);
    expect(seen.covered).toBeGreaterThan(0);
    expect(seen.edge).toBeGreaterThan(0);
  });

  it('checkBeamStop names the bad field', () => {
    expect(() => checkBeamStop({ ...stop, transmission: 1 })).toThrow(/beamStop.transmission must lie in \[0, 1\)/);
    expect(() => checkBeamStop({ ...stop, stemWidthPx: 41 })).toThrow(/beamStop.stemWidthPx must lie in \[0, 2 radiusPx\] = \[0, 40\] px; got 41/);
    expect(() => checkBeamStop({ ...stop, radiusPx: -3 })).toThrow(/beamStop.radiusPx must be > 0 px; got -3/);
  });
});
