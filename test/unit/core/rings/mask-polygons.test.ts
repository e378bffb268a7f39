import { describe, expect, it } from 'vitest';
import { maskPolygons, parseMaskPolygons } from '../../../../core/rings/mask-polygons';
import { countExcluded } from '../../../../core/rings/mask-combine';

const at = (m: { width: number; excluded: Uint8Array }, i: number, j: number) => m.excluded[j * m.width + i];

describe('maskPolygons', () => {
  it('fills the pixel centres inside a square, left and top edges in, right and bottom out', () => {
    const m = maskPolygons(10, 10, [{ points: [[2, 2], [6, 2], [6, 5], [2, 5]] }]);
    // Centres x = 2..5, y = 2..4.
    expect(countExcluded(m)).toBe(4 * 3);
    expect(at(m, 2, 2)).toBe(1);
    expect(at(m, 5, 4)).toBe(1);
    expect(at(m, 6, 3)).toBe(0);
    expect(at(m, 3, 5)).toBe(0);
  });
  it('gives two squares sharing an edge every pixel exactly once', () => {
    const a = maskPolygons(10, 10, [{ points: [[1.5, 1.5], [4.5, 1.5], [4.5, 6.5], [1.5, 6.5]] }]);
    const b = maskPolygons(10, 10, [{ points: [[4.5, 1.5], [8.5, 1.5], [8.5, 6.5], [4.5, 6.5]] }]);
    const both = maskPolygons(10, 10, [{ points: [[1.5, 1.5], [8.5, 1.5], [8.5, 6.5], [1.5, 6.5]] }]);
    expect(countExcluded(a) + countExcluded(b)).toBe(countExcluded(both));
    expect(countExcluded(both)).toBe(7 * 5);
  });
  it('fills a triangle by area (half of a 40 x 40 square, within its edge pixels)', () => {
    const m = maskPolygons(50, 50, [{ points: [[0.3, 0.3], [40.3, 0.3], [0.3, 40.3]] }]);
    expect(Math.abs(countExcluded(m) - 800)).toBeLessThan(41);
  });
  it('leaves a hole where a self-crossing outline goes round twice (even-odd rule)', () => {
    // Outer square 0..8 then inner square 3..5 in the same outline.
    const m = maskPolygons(10, 10, [{ points: [[0, 0], [8, 0], [8, 8], [0, 8], [0, 0], [3, 3], [3, 5], [5, 5], [5, 3], [3, 3]] }]);
    expect(at(m, 1, 1)).toBe(1);
    expect(at(m, 4, 4)).toBe(0);
  });
  it('clips polygons that reach outside the image', () => {
    const m = maskPolygons(5, 5, [{ points: [[-10, -10], [20, -10], [20, 2.5], [-10, 2.5]] }]);
    expect(countExcluded(m)).toBe(15);
  });
});

describe('parseMaskPolygons', () => {
  it('accepts the JSON form', () => {
    expect(parseMaskPolygons(JSON.parse('[{"points":[[0,0],[1,0],[0,1]]}]'))).toHaveLength(1);
  });
  it('names the bad entry', () => {
    expect(() => parseMaskPolygons({})).toThrow(/must be an array/);
    expect(() => parseMaskPolygons([{ points: [[0, 0], [1, 1]] }])).toThrow(/polygons\[0\]\.points needs at least 3 vertices/);
    expect(() => parseMaskPolygons([{ points: [[0, 0], [1, 1], [2, 'x']] }])).toThrow(/polygons\[0\]\.points\[2\] must be \[x, y\]/);
    expect(() => parseMaskPolygons([{ pts: [] }])).toThrow(/polygons\[0\] must be an object with "points"/);
  });
});
