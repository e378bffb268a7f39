/**
 * Byte-to-text decoding for image metadata (TIFF ASCII fields, PNG text chunks,
 * JPEG comments). core/ sees only the ECMAScript library, which has no TextDecoder,
 * so the two encodings metadata use are decoded here.
 */

/** Latin-1 (ISO/IEC 8859-1): each byte is the code point of the same number. */
export function decodeLatin1(bytes: Uint8Array): string {
  let s = '';
  for (let i = 0; i < bytes.length; i += 8192) {
    s += String.fromCharCode(...bytes.subarray(i, Math.min(i + 8192, bytes.length)));
  }
  return s;
}

/**
 * Strict UTF-8 (RFC 3629): returns undefined for any ill-formed sequence (overlong
 * forms, surrogates, code points above U+10FFFF, truncated sequences), so callers can
 * fall back to another encoding.
 */
export function decodeUtf8(bytes: Uint8Array): string | undefined {
  const points: number[] = [];
  let s = '';
  for (let i = 0; i < bytes.length; ) {
    const b = bytes[i]!;
    let cp: number;
    let extra: number;
    let min: number;
    if (b < 0x80) {
      cp = b; extra = 0; min = 0;
    } else if (b >= 0xc2 && b <= 0xdf) {
      cp = b & 0x1f; extra = 1; min = 0x80;
    } else if (b >= 0xe0 && b <= 0xef) {
      cp = b & 0x0f; extra = 2; min = 0x800;
    } else if (b >= 0xf0 && b <= 0xf4) {
      cp = b & 0x07; extra = 3; min = 0x10000;
    } else {
      return undefined;
    }
    for (let k = 1; k <= extra; k++) {
      const c = bytes[i + k];
      if (c === undefined || (c & 0xc0) !== 0x80) return undefined;
      cp = (cp << 6) | (c & 0x3f);
    }
    if (cp < min || cp > 0x10ffff || (cp >= 0xd800 && cp <= 0xdfff)) return undefined;
    points.push(cp);
    if (points.length >= 8192) {
      s += String.fromCodePoint(...points);
      points.length = 0;
    }
    i += 1 + extra;
  }
  return s + String.fromCodePoint(...points);
}
