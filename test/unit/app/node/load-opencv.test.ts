import { describe, expect, it } from 'vitest';
import { loadOpenCv } from '../../../../app/node/load-opencv';

describe('loadOpenCv', () => {
  it('loads opencv-wasm once and blurs a float image (GaussianBlur keeps the sum of an interior impulse)', () => {
    const cv = loadOpenCv();
    expect(loadOpenCv()).toBe(cv);
    const src = new cv.Mat(21, 21, cv.CV_32F, new cv.Scalar(0));
    src.data32F[10 * 21 + 10] = 1;
    const dst = new cv.Mat();
    cv.GaussianBlur(src, dst, new cv.Size(7, 7), 1.0, 1.0, cv.BORDER_REFLECT);
    let sum = 0;
    for (const v of dst.data32F) sum += v;
    expect(sum).toBeCloseTo(1, 5);
    expect(dst.data32F[10 * 21 + 10]).toBeLessThan(1);
    src.delete();
    dst.delete();
  });
});
