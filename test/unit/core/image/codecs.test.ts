import { describe, expect, it } from 'vitest';
import { LUMINANCE_WEIGHTS_BT709 } from '../../../../core/image';
import { luminance } from '../../../../core/image/luminance';
import { decodePackBits } from '../../../../core/image/packbits';
import { decodeUtf8 } from '../../../../core/image/text-decoding';
import { decodeTiffLzw } from '../../../../core/image/tiff-lzw';
import { undoFloatingPointPredictor, undoHorizontalDifferencing } from '../../../../core/image/tiff-predictor';
import { packCodes } from './hand-made-tiff';

describe('decodePackBits', () => {
  it('decodePackBits unpacks the example of TIFF 6.0 section 9 (from memory) to its 24 bytes', () => {
    const packed = new Uint8Array([0xfe, 0xaa, 0x02, 0x80, 0x00, 0x2a, 0xfd, 0xaa, 0x03, 0x80, 0x00, 0x2a, 0x22, 0xf7, 0xaa]);
    const unpacked = [0xaa, 0xaa, 0xaa, 0x80, 0x00, 0x2a, 0xaa, 0xaa, 0xaa, 0xaa, 0x80, 0x00, 0x2a, 0x22, ...new Array<number>(10).fill(0xaa)];
    const out = new Uint8Array(24);
    expect(decodePackBits(packed, out)).toEqual({ bytesWritten: 24 });
    expect(Array.from(out)).toEqual(unpacked);
  });

  it('decodePackBits skips the -128 no-op and reports a literal that runs past the input', () => {
    const out = new Uint8Array(4);
    expect(decodePackBits(new Uint8Array([0x80, 0x00, 5]), out)).toEqual({ bytesWritten: 1 });
    expect(decodePackBits(new Uint8Array([0x05, 1, 2]), out).problem).toMatch(/literal of 6 bytes runs past/);
  });
});

describe('decodeTiffLzw', () => {
  it('decodeTiffLzw(clear, A, B, 258, end) gives ABAB', () => {
    const out = new Uint8Array(4);
    expect(decodeTiffLzw(packCodes([256, 65, 66, 258, 257]), out)).toEqual({ bytesWritten: 4 });
    expect(String.fromCharCode(...out)).toBe('ABAB');
  });

  it('decodeTiffLzw stops when its output is full and reports a code that must be a literal', () => {
    const out = new Uint8Array(2);
    expect(decodeTiffLzw(packCodes([256, 65, 66, 258, 257]), out)).toEqual({ bytesWritten: 2 });
    expect(decodeTiffLzw(packCodes([256, 300]), new Uint8Array(4)).problem).toMatch(/must follow a clear code/);
  });
});

describe('TIFF predictors', () => {
  it('undoHorizontalDifferencing sums each row from its own first sample, modulo 2^8', () => {
    const buf = new Uint8Array([250, 10, 1, 5, 5, 5]);
    undoHorizontalDifferencing(buf, 1, 3, 2, 1);
    expect(Array.from(buf)).toEqual([250, 4, 5, 5, 10, 15]);
  });

  it('undoHorizontalDifferencing keeps channels apart with stride 3 (RGB)', () => {
    const buf = new Uint8Array([10, 20, 30, 1, 2, 3]);
    undoHorizontalDifferencing(buf, 1, 6, 1, 3);
    expect(Array.from(buf)).toEqual([10, 20, 30, 11, 22, 33]);
  });

  it('undoFloatingPointPredictor recovers 1.5 and -2.25 from their differenced byte planes (Adobe TN3 layout)', () => {
    // Big-endian bytes 3F C0 00 00 and C0 10 00 00, as planes [3F C0][C0 10][00 00][00 00], differenced.
    const buf = new Uint8Array([0x3f, 0x81, 0x00, 0x50, 0xf0, 0x00, 0x00, 0x00]);
    undoFloatingPointPredictor(buf, 4, 2, 1, 1, new Uint8Array(8));
    expect(Array.from(new Float32Array(buf.buffer))).toEqual([1.5, -2.25]);
  });
});

describe('luminance', () => {
  it('LUMINANCE_WEIGHTS_BT709 are 0.2126, 0.7152, 0.0722 and sum to 1', () => {
    expect(LUMINANCE_WEIGHTS_BT709).toEqual({ r: 0.2126, g: 0.7152, b: 0.0722 });
    expect(LUMINANCE_WEIGHTS_BT709.r + LUMINANCE_WEIGHTS_BT709.g + LUMINANCE_WEIGHTS_BT709.b).toBeCloseTo(1, 15);
  });
  it('luminance(v, v, v) is v exactly; luminance(1000, 0, 0) is 212.6', () => {
    for (const v of [0, 1, 255, 65535, -3.25, 4294967295]) expect(luminance(v, v, v)).toBe(v);
    expect(luminance(1000, 0, 0)).toBeCloseTo(212.6, 12);
  });
});

describe('decodeUtf8', () => {
  it('decodeUtf8 reads µ and Å and refuses a lone continuation byte or an overlong form', () => {
    expect(decodeUtf8(new Uint8Array([0xc2, 0xb5, 0xc3, 0x85]))).toBe('µÅ');
    expect(decodeUtf8(new Uint8Array([0x41, 0x80]))).toBeUndefined();
    expect(decodeUtf8(new Uint8Array([0xc0, 0xaf]))).toBeUndefined();
    expect(decodeUtf8(new Uint8Array([0xe2, 0x82]))).toBeUndefined();
  });
});
