import { describe, expect, it } from 'vitest';
import { decodeImage, ImageDecodeError } from '../../../../core/image';

function reasonOf(bytes: Uint8Array): [string, string] {
  try {
    decodeImage(bytes, { name: 'notes.txt' });
  } catch (error) {
    if (error instanceof ImageDecodeError) return [error.reason, error.message];
    throw error;
  }
  throw new Error('decodeImage did not throw');
}

const ascii = (s: string) => new Uint8Array([...s].map((c) => c.charCodeAt(0)));

describe('decodeImage tells formats by their first bytes', () => {
  it('decodeImage(a text file) refuses with not-an-image, naming the file and saying it holds text', () => {
    const [reason, message] = reasonOf(ascii('camera length 1.2 m\nvoltage 200 kV\n'));
    expect(reason).toBe('not-an-image');
    expect(message).toBe('notes.txt: the file holds text, not an image; choose the image file itself (TIFF, PNG or JPEG)');
  });

  it('decodeImage(no bytes) refuses with empty', () => {
    expect(reasonOf(new Uint8Array(0))[0]).toBe('empty');
  });

  it('decodeImage(a PDF) refuses with not-an-image; a GIF or a BMP with unsupported', () => {
    expect(reasonOf(ascii('%PDF-1.7\n%\xe2\xe3'))).toEqual(['not-an-image', expect.stringMatching(/a PDF document, not an image/)]);
    expect(reasonOf(ascii('GIF89a\x01\x00\x01\x00'))).toEqual(['unsupported', expect.stringMatching(/a GIF image, which Annula does not read/)]);
    expect(reasonOf(ascii('BM\x3a\x00\x00\x00'))[0]).toBe('unsupported');
  });

  it('decodeImage(binary bytes of no known format) refuses with not-an-image and shows the first bytes', () => {
    const [reason, message] = reasonOf(new Uint8Array([0x00, 0x13, 0x37, 0xfe, 0x01, 0x02, 0x03, 0x04, 0x05]));
    expect(reason).toBe('not-an-image');
    expect(message).toMatch(/starts with bytes 00 13 37 fe 01 02 03 04/);
  });

  it('decodeImage(II with a wrong version number) refuses as not-an-image', () => {
    expect(reasonOf(new Uint8Array([0x49, 0x49, 0x2a, 0x00, 8, 0, 0, 0]).map((b, i) => (i === 2 ? 41 : b)))[0]).toBe('not-an-image');
  });

  it('decodeImage does not look at the name: a TIFF called .png is read as TIFF', () => {
    const tiff = new Uint8Array([0x49, 0x49, 0x2a, 0x00, 0x08, 0, 0, 0, 0, 0, 0, 0, 0, 0]);
    // A header with an IFD of zero entries: recognised as TIFF, refused for having no ImageWidth.
    expect(() => decodeImage(tiff, { name: 'looks-like.png' })).toThrow(/looks-like\.png: the TIFF page has no ImageWidth tag/);
  });
});

describe('decodeImage checks its options', () => {
  const bytes = new Uint8Array([0x89, 0x50, 0x4e, 0x47]);
  it('decodeImage(bytes, { page: -1 }) throws a RangeError naming page', () => {
    expect(() => decodeImage(bytes, { page: -1 })).toThrow(RangeError);
    expect(() => decodeImage(bytes, { page: 1.5 })).toThrow(/page must be a whole number >= 0; got 1.5/);
  });
  it('decodeImage(bytes, { maxPixels: 0 }) throws a RangeError naming maxPixels', () => {
    expect(() => decodeImage(bytes, { maxPixels: 0 })).toThrow(/maxPixels must be a positive, finite number of pixels; got 0/);
    expect(() => decodeImage(bytes, { maxPixels: Number.NaN })).toThrow(RangeError);
  });
  it('decodeImage(not a Uint8Array) throws a TypeError', () => {
    expect(() => decodeImage([1, 2, 3] as unknown as Uint8Array)).toThrow(TypeError);
  });
});
