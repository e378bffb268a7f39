import { encode as encodePng } from 'fast-png';
import jpeg from 'jpeg-js';
import { describe, expect, it } from 'vitest';
import { decodeImage, ImageDecodeError, type ImageDecodeReason } from '../../../../core/image';

function expectRefusal(bytes: Uint8Array, reason: ImageDecodeReason, text: RegExp, name = 'film-7.png'): void {
  let caught: unknown;
  try {
    decodeImage(bytes, { name });
  } catch (error) {
    caught = error;
  }
  expect(caught).toBeInstanceOf(ImageDecodeError);
  const e = caught as ImageDecodeError;
  expect([e.reason, e.message.startsWith(`${name}: `)]).toEqual([reason, true]);
  expect(e.message).toMatch(text);
}

// A 4 x 3 16-bit gray PNG written by fast-png's encoder (the decoder's sibling, not Annula).
const grayValues = new Uint16Array([0, 1, 2, 3, 1000, 2000, 3000, 4000, 65535, 65534, 32768, 7]);
const png16 = encodePng({ width: 4, height: 3, data: grayValues, depth: 16, channels: 1 });

// A 16 x 8 gray JPEG written by jpeg-js's encoder (RGBA in, gray values).
const jpegBytes = (() => {
  const rgba = new Uint8Array(16 * 8 * 4);
  for (let i = 0; i < 16 * 8; i++) rgba.set([i * 2, i * 2, i * 2, 255], i * 4);
  return new Uint8Array(jpeg.encode({ width: 16, height: 8, data: rgba }, 95).data);
})();

function findMarker(bytes: Uint8Array, marker: number): number {
  for (let i = 2; i < bytes.length - 1; i++) if (bytes[i] === 0xff && bytes[i + 1] === marker) return i;
  throw new Error(`marker ${marker.toString(16)} not found`);
}

describe('decodeImage on hand-made PNGs', () => {
  it('decodeImage(16-bit gray PNG from fast-png) gives its twelve samples exactly', () => {
    const { raster, info } = decodeImage(png16);
    expect(Array.from(raster.data)).toEqual(Array.from(grayValues));
    expect(info).toMatchObject({ format: 'png', bitsPerSample: 16, channels: 1, pageCount: 1 });
  });

  it('decodeImage refuses an IHDR declaring 30000 x 30000 as too-large, before decoding', () => {
    const bytes = png16.slice();
    const view = new DataView(bytes.buffer);
    view.setUint32(16, 30000);
    view.setUint32(20, 30000);
    expectRefusal(bytes, 'too-large', /PNG declares 30000 x 30000/);
  });

  it('decodeImage refuses zero width as empty', () => {
    const bytes = png16.slice();
    new DataView(bytes.buffer).setUint32(16, 0);
    expectRefusal(bytes, 'empty', /0 x 3 image/);
  });

  it('decodeImage refuses a PNG cut in half as truncated', () => {
    expectRefusal(png16.subarray(0, Math.floor(png16.length / 2)), 'truncated', /PNG ends at byte/);
  });

  it('decodeImage refuses a PNG with a damaged IDAT byte as corrupt (CRC)', () => {
    const bytes = png16.slice();
    bytes[findIdat(bytes) + 10]! ^= 0x55;
    expectRefusal(bytes, 'corrupt', /PNG cannot be decoded/);
  });

  it('decodeImage refuses a colour type and bit depth the PNG standard forbids as corrupt', () => {
    const bytes = png16.slice();
    bytes[24] = 4; // bit depth 4 with colour type 0 is allowed; make it colour type 2 (RGB), which is not
    bytes[25] = 2;
    expectRefusal(bytes, 'corrupt', /colour type 2 with bit depth 4/);
  });

  it('decodeImage({ page: 1 }) on a PNG refuses with no-such-page', () => {
    let caught: unknown;
    try {
      decodeImage(png16, { page: 1, name: 'a.png' });
    } catch (error) {
      caught = error;
    }
    expect((caught as ImageDecodeError).reason).toBe('no-such-page');
  });
});

function findIdat(bytes: Uint8Array): number {
  for (let i = 8; i < bytes.length - 4; i++) {
    if (bytes[i] === 0x49 && bytes[i + 1] === 0x44 && bytes[i + 2] === 0x41 && bytes[i + 3] === 0x54) return i + 4;
  }
  throw new Error('no IDAT');
}

describe('decodeImage on hand-made JPEGs', () => {
  it('decodeImage(gray JPEG from jpeg-js) gives values within 2 grey levels of the ramp it encoded at quality 95', () => {
    const { raster, info } = decodeImage(jpegBytes);
    expect([raster.width, raster.height, info.format]).toEqual([16, 8, 'jpeg']);
    let worst = 0;
    for (let i = 0; i < 128; i++) worst = Math.max(worst, Math.abs(raster.data[i]! - i * 2));
    expect(worst).toBeLessThanOrEqual(2);
  });

  it('decodeImage refuses a frame header declaring 30000 x 30000 as too-large', () => {
    const bytes = jpegBytes.slice();
    const sof = findMarker(bytes, 0xc0);
    new DataView(bytes.buffer).setUint16(sof + 5, 30000);
    new DataView(bytes.buffer).setUint16(sof + 7, 30000);
    expectRefusal(bytes, 'too-large', /JPEG declares 30000 x 30000/, 'a.jpg');
  });

  it('decodeImage refuses lossless (SOF3) and 12-bit JPEG as unsupported', () => {
    const lossless = jpegBytes.slice();
    lossless[findMarker(lossless, 0xc0) + 1] = 0xc3;
    expectRefusal(lossless, 'unsupported', /JPEG is lossless/, 'a.jpg');
    const twelve = jpegBytes.slice();
    twelve[findMarker(twelve, 0xc0) + 4] = 12;
    expectRefusal(twelve, 'unsupported', /12-bit samples/, 'a.jpg');
  });

  it('decodeImage refuses a JPEG cut before its end marker as truncated', () => {
    expectRefusal(jpegBytes.subarray(0, jpegBytes.length - 40), 'truncated', /without its end-of-image marker/, 'a.jpg');
  });

  it('decodeImage refuses a JPEG cut inside its headers as truncated', () => {
    expectRefusal(jpegBytes.subarray(0, 30), 'truncated', /JPEG ends at byte 30/, 'a.jpg');
  });
});
