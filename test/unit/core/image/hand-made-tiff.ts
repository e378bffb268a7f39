/**
 * Builds small classic TIFF files byte by byte (TIFF 6.0 section 2 layout) for the
 * guard tests: header, one IFD right after it, long values, then the pixel data, so
 * cutting the tail of the file cuts the pixel data.
 */

export type TiffValues = number[] | string;

export interface HandMadeTiff {
  width: number;
  height: number;
  data: Uint8Array;
  bitsPerSample?: number;
  samplesPerPixel?: number;
  compression?: number;
  photometric?: number;
  sampleFormat?: number;
  littleEndian?: boolean;
  /** Further entries as [tag, type (2 ASCII, 3 SHORT, 4 LONG, 5 RATIONAL), values]. */
  extra?: Array<[number, number, TiffValues]>;
  /** Tags to leave out. */
  omit?: number[];
  /** Offset of the next IFD (default 0, the end of the chain); 8 points back at this IFD. */
  nextIfd?: number;
  /** Overrides StripOffsets / StripByteCounts. */
  stripOffset?: number;
  stripByteCount?: number;
}

const SIZE: Record<number, number> = { 2: 1, 3: 2, 4: 4, 5: 8 };

export function handMadeTiff(spec: HandMadeTiff): Uint8Array {
  const le = spec.littleEndian ?? true;
  const spp = spec.samplesPerPixel ?? 1;
  const base: Array<[number, number, TiffValues]> = [
    [256, 4, [spec.width]],
    [257, 4, [spec.height]],
    [258, 3, new Array<number>(spp).fill(spec.bitsPerSample ?? 8)],
    [259, 3, [spec.compression ?? 1]],
    [262, 3, [spec.photometric ?? 1]],
    [273, 4, [0]],
    [277, 3, [spp]],
    [278, 4, [spec.height]],
    [279, 4, [spec.stripByteCount ?? spec.data.length]],
  ];
  if (spec.sampleFormat !== undefined) base.push([339, 3, new Array<number>(spp).fill(spec.sampleFormat)]);
  const entries = [...base, ...(spec.extra ?? [])].filter(([tag]) => !(spec.omit ?? []).includes(tag));
  entries.sort((a, b) => a[0] - b[0]);

  const ifdSize = 2 + entries.length * 12 + 4;
  const longValues: Array<{ at: number; bytes: number[] }> = [];
  let cursor = 8 + ifdSize;
  const encoded = entries.map(([tag, type, values]) => {
    const bytes = encodeValues(type, values, le);
    const count = typeof values === 'string' ? values.length + 1 : type === 5 ? values.length / 2 : values.length;
    if (bytes.length > 4) {
      const at = cursor;
      longValues.push({ at, bytes });
      cursor += bytes.length + (bytes.length % 2);
      return { tag, type, count, inline: undefined as number[] | undefined, at };
    }
    return { tag, type, count, inline: [...bytes, 0, 0, 0, 0].slice(0, 4), at: 0 };
  });
  const dataAt = cursor;
  const total = dataAt + spec.data.length;
  const out = new Uint8Array(total);
  const view = new DataView(out.buffer);
  out.set(le ? [0x49, 0x49] : [0x4d, 0x4d], 0);
  view.setUint16(2, 42, le);
  view.setUint32(4, 8, le);
  view.setUint16(8, entries.length, le);
  encoded.forEach((e, i) => {
    const at = 10 + i * 12;
    view.setUint16(at, e.tag, le);
    view.setUint16(at + 2, e.type, le);
    view.setUint32(at + 4, e.count, le);
    if (e.tag === 273) view.setUint32(at + 8, spec.stripOffset ?? dataAt, le);
    else if (e.inline !== undefined) out.set(e.inline, at + 8);
    else view.setUint32(at + 8, e.at, le);
  });
  view.setUint32(10 + entries.length * 12, spec.nextIfd ?? 0, le);
  for (const { at, bytes } of longValues) out.set(bytes, at);
  out.set(spec.data, dataAt);
  return out;
}

function encodeValues(type: number, values: TiffValues, le: boolean): number[] {
  if (typeof values === 'string') return [...values].map((c) => c.charCodeAt(0)).concat(0);
  const size = SIZE[type]!;
  const buf = new DataView(new ArrayBuffer(values.length * (type === 5 ? 4 : size)));
  values.forEach((v, i) => {
    if (type === 3) buf.setUint16(2 * i, v, le);
    else buf.setUint32(4 * i, v, le);
  });
  return [...new Uint8Array(buf.buffer)];
}

/** Packs LZW codes most-significant bit first at the given width (9 unless stated). */
export function packCodes(codes: number[], width = 9): Uint8Array {
  const bits: number[] = [];
  for (const code of codes) for (let b = width - 1; b >= 0; b--) bits.push((code >> b) & 1);
  const out = new Uint8Array(Math.ceil(bits.length / 8));
  bits.forEach((bit, i) => {
    out[i >> 3]! |= bit << (7 - (i & 7));
  });
  return out;
}
