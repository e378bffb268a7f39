import { describe, expect, it } from 'vitest';
import { decodeImage, ImageDecodeError, type ImageDecodeReason } from '../../../../core/image';
import { handMadeTiff, packCodes } from './hand-made-tiff';

/** Runs decodeImage and returns the ImageDecodeError it throws (fails the test if it does not). */
function refusal(bytes: Uint8Array, options: Parameters<typeof decodeImage>[1] = {}): ImageDecodeError {
  try {
    decodeImage(bytes, { name: 'film-7.tif', ...options });
  } catch (error) {
    expect(error).toBeInstanceOf(ImageDecodeError);
    return error as ImageDecodeError;
  }
  throw new Error('decodeImage did not throw');
}

function expectRefusal(bytes: Uint8Array, reason: ImageDecodeReason, text: RegExp, options = {}): void {
  const e = refusal(bytes, options);
  expect(e.reason).toBe(reason);
  expect(e.sourceName).toBe('film-7.tif');
  expect(e.message).toMatch(/^film-7\.tif: .+; .+/);
  expect(e.message).toMatch(text);
}

const gray3x2 = new Uint8Array([1, 2, 3, 4, 5, 6]);

describe('decodeImage on hand-made TIFFs', () => {
  it('decodeImage(3 x 2 8-bit gray) gives the six samples in row order (the helper itself is sound)', () => {
    const { raster, info } = decodeImage(handMadeTiff({ width: 3, height: 2, data: gray3x2 }));
    expect(Array.from(raster.data)).toEqual([1, 2, 3, 4, 5, 6]);
    expect(info).toMatchObject({ format: 'tiff', bitsPerSample: 8, sampleFormat: 'uint', channels: 1, page: 0, pageCount: 1, byteOrder: 'little', layout: 'strips' });
  });

  it('decodeImage(big-endian 16-bit signed) reads the byte order and sign', () => {
    const data = new Uint8Array([0x80, 0x00, 0xff, 0xff, 0x7f, 0xff, 0x00, 0x01]);
    const { raster, info } = decodeImage(handMadeTiff({ width: 2, height: 2, bitsPerSample: 16, sampleFormat: 2, littleEndian: false, data }));
    expect(Array.from(raster.data)).toEqual([-32768, -1, 32767, 1]);
    expect(info.byteOrder).toBe('big');
  });

  it('decodeImage keeps ImageDescription and the resolution in pixels per centimetre', () => {
    const bytes = handMadeTiff({
      width: 3, height: 2, data: gray3x2,
      extra: [[270, 2, 'invented film 7'], [282, 5, [7000, 10]], [283, 5, [7000, 10]], [296, 3, [3]]],
    });
    const { info } = decodeImage(bytes);
    expect(info.text).toEqual({ ImageDescription: 'invented film 7' });
    expect(info.resolution).toEqual({ xPerUnit: 700, yPerUnit: 700, unit: 'cm' });
  });

  it('decodeImage refuses a header declaring 30000 x 30000 as too-large, before reading any strip', () => {
    // The strip offset points far past the end: the size check must come first.
    const bytes = handMadeTiff({ width: 30000, height: 30000, data: gray3x2, stripOffset: 1 << 30 });
    expectRefusal(bytes, 'too-large', /30000 x 30000 = 9\.00e\+8 pixels, above the limit of 4\.00e\+8/);
  });

  it('decodeImage honours a lower maxPixels', () => {
    expectRefusal(handMadeTiff({ width: 3, height: 2, data: gray3x2 }), 'too-large', /6 pixels|6\.00e\+0 pixels/, { maxPixels: 5 });
  });

  it('decodeImage refuses a 19000 x 19000 header over 6 bytes of data as truncated without allocating the 1.4 GB raster', () => {
    const bytes = handMadeTiff({ width: 19000, height: 19000, data: gray3x2, stripByteCount: 19000 * 19000 });
    const before = process.memoryUsage().arrayBuffers;
    expectRefusal(bytes, 'truncated', /ends at byte \d+, before the end of strip 0/);
    expect(process.memoryUsage().arrayBuffers - before).toBeLessThan(64 * 2 ** 20);
  });

  it('decodeImage refuses zero width as empty', () => {
    expectRefusal(handMadeTiff({ width: 0, height: 2, data: gray3x2 }), 'empty', /0 x 2 image, which has no pixels/);
  });

  it('decodeImage refuses a TIFF cut inside its pixel data as truncated', () => {
    const whole = handMadeTiff({ width: 3, height: 2, data: gray3x2 });
    expectRefusal(whole.subarray(0, whole.length - 2), 'truncated', /before the end of strip 0/);
  });

  it('decodeImage refuses a TIFF cut inside its directory as truncated', () => {
    const whole = handMadeTiff({ width: 3, height: 2, data: gray3x2 });
    expectRefusal(whole.subarray(0, 40), 'truncated', /page directory/);
  });

  for (const [code, name] of [[7, 'JPEG'], [6, 'old-style JPEG'], [2, 'CCITT modified Huffman'], [3, 'CCITT Group 3 fax'], [4, 'CCITT Group 4 fax'], [50000, 'Zstandard'], [34712, 'JPEG 2000'], [12345, 'compression code 12345']] as const) {
    it(`decodeImage refuses compression ${code} as unsupported, naming ${name}`, () => {
      expectRefusal(handMadeTiff({ width: 3, height: 2, data: gray3x2, compression: code }), 'unsupported', new RegExp(`compressed with ${name}`));
    });
  }

  it('decodeImage refuses 16-bit floats, 1-bit and 64-bit integer samples as unsupported', () => {
    expectRefusal(handMadeTiff({ width: 3, height: 1, bitsPerSample: 16, sampleFormat: 3, data: new Uint8Array(6) }), 'unsupported', /16-bit floating-point/);
    expectRefusal(handMadeTiff({ width: 8, height: 1, bitsPerSample: 1, data: new Uint8Array(1) }), 'unsupported', /1-bit unsigned integer/);
    expectRefusal(handMadeTiff({ width: 1, height: 1, bitsPerSample: 64, sampleFormat: 2, data: new Uint8Array(8) }), 'unsupported', /64-bit signed integer/);
  });

  it('decodeImage refuses CMYK and raw sensor mosaics as unsupported', () => {
    expectRefusal(handMadeTiff({ width: 1, height: 1, samplesPerPixel: 4, photometric: 5, data: new Uint8Array(4) }), 'unsupported', /separated \(CMYK\)/);
    expectRefusal(handMadeTiff({ width: 3, height: 2, photometric: 32803, data: gray3x2 }), 'unsupported', /colour filter array/);
  });

  it('decodeImage({ page: 1 }) on a one-page TIFF refuses with no-such-page, saying how many there are', () => {
    expectRefusal(handMadeTiff({ width: 3, height: 2, data: gray3x2 }), 'no-such-page', /has 1 page\(s\)/, { page: 1 });
  });

  it('decodeImage refuses a page chain that loops as corrupt', () => {
    expectRefusal(handMadeTiff({ width: 3, height: 2, data: gray3x2, nextIfd: 8 }), 'corrupt', /loops back to byte 8/);
  });

  it('decodeImage refuses an LZW strip with a code beyond the table as corrupt', () => {
    const data = packCodes([256, 65, 400, 257]);
    expectRefusal(handMadeTiff({ width: 3, height: 1, compression: 5, data }), 'corrupt', /strip 0 of the TIFF: LZW code 400 is beyond the table's 258 entries/);
  });

  it('decodeImage refuses an LZW strip that ends early as truncated', () => {
    const data = packCodes([256, 65, 66, 257]);
    expectRefusal(handMadeTiff({ width: 3, height: 2, compression: 5, data }), 'truncated', /decodes to 2 bytes where its pixels need 6/);
  });

  it('decodeImage refuses a damaged deflate strip as corrupt', () => {
    expectRefusal(handMadeTiff({ width: 3, height: 2, compression: 8, data: new Uint8Array([0x78, 0x9c, 0xff, 0xff, 0xff, 0x00]) }), 'corrupt', /deflate stream is damaged/);
  });

  it('decodeImage reads an LZW strip with a clear code and the code-not-yet-in-table case', () => {
    // Clear, 'A', then 258 before it is in the table: old string 'A' + its first byte = 'AA'; then 'B'.
    const data = packCodes([256, 65, 258, 66, 257]);
    const { raster } = decodeImage(handMadeTiff({ width: 4, height: 1, compression: 5, data }));
    expect(Array.from(raster.data)).toEqual([65, 65, 65, 66]);
  });

  it('decodeImage reads a PackBits strip', () => {
    const data = new Uint8Array([0xfe, 7, 0x02, 1, 2, 3]);
    const { raster } = decodeImage(handMadeTiff({ width: 3, height: 2, compression: 32773, data }));
    expect(Array.from(raster.data)).toEqual([7, 7, 7, 1, 2, 3]);
  });

  it('decodeImage inverts WhiteIsZero and says so', () => {
    const { raster, info } = decodeImage(handMadeTiff({ width: 3, height: 2, photometric: 0, data: gray3x2 }));
    expect(Array.from(raster.data)).toEqual([254, 253, 252, 251, 250, 249]);
    expect(info.warnings.join()).toMatch(/WhiteIsZero: inverted/);
  });
});
