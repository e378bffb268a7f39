/**
 * The container layer of TIFF: the header, the chain of image file directories
 * (IFDs, one per page) and the values of their fields. No pixel data are read here.
 *
 * Layout from TIFF Revision 6.0 (Adobe, 1992), section 2 "TIFF Structure": an 8-byte
 * header (byte order "II" or "MM", the number 42, the offset of the first IFD), then
 * IFDs of 12-byte entries (tag, type, count, value or offset), each IFD ending with the
 * offset of the next (0 ends the chain). BigTIFF (the widely used 64-bit extension: the
 * number 43, 8-byte offsets and counts, 20-byte entries) is read too.
 *
 * Every offset is checked against the file length before it is followed, so a
 * damaged file gives an ImageDecodeError, never an out-of-range read or a huge
 * allocation.
 */
import { ImageDecodeError } from './image-decode-error';
import { decodeLatin1, decodeUtf8 } from './text-decoding';

/** One IFD entry as stored; `valueOffset` is where its values start in the file. */
export interface TiffEntry {
  tag: number;
  /** TIFF field type: 1 BYTE, 2 ASCII, 3 SHORT, 4 LONG, 5 RATIONAL, ... 16 LONG8. */
  type: number;
  count: number;
  valueOffset: number;
}

/** A TIFF file opened for reading: byte order and where its pages' IFDs are. */
export interface TiffContainer {
  bytes: Uint8Array;
  view: DataView;
  littleEndian: boolean;
  bigTiff: boolean;
  /** File offset of each page's IFD, in chain order. */
  directoryOffsets: number[];
  /** Name used in error messages. */
  name: string;
}

/** Field types and their size in bytes (TIFF 6.0 section 2, BigTIFF adds 16, 17, 18). */
const TYPE_SIZE: Record<number, number> = {
  1: 1, 2: 1, 3: 2, 4: 4, 5: 8, 6: 1, 7: 1, 8: 2, 9: 4, 10: 8, 11: 4, 12: 8, 13: 4, 16: 8, 17: 8, 18: 8,
};

/** Pages beyond this many are not counted; a chain that long is taken as damaged. */
const MAX_PAGES = 100_000;

const ADVICE_DAMAGED = 'the file is damaged: copy it again from the instrument or re-export it';

function truncated(name: string, what: string): ImageDecodeError {
  return new ImageDecodeError(name, 'truncated', `the TIFF ends before ${what}`, ADVICE_DAMAGED);
}

/** Reads an unsigned 64-bit value as a Number (exact below 2^53, which any real offset is). */
function readUint64(view: DataView, at: number, le: boolean): number {
  const lo = view.getUint32(at + (le ? 0 : 4), le);
  const hi = view.getUint32(at + (le ? 4 : 0), le);
  return hi * 2 ** 32 + lo;
}

/**
 * Opens a TIFF: checks the header and walks the IFD chain to count the pages.
 * Throws ImageDecodeError 'truncated' or 'corrupt' for a damaged header or chain.
 */
export function openTiff(bytes: Uint8Array, name: string): TiffContainer {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (bytes.length < 8) throw truncated(name, 'the end of its 8-byte header');
  const order = view.getUint16(0, false);
  if (order !== 0x4949 && order !== 0x4d4d) {
    throw new ImageDecodeError(name, 'not-an-image', 'the file does not start with a TIFF byte-order mark (II or MM)', 'choose a TIFF, PNG or JPEG image');
  }
  const littleEndian = order === 0x4949;
  const version = view.getUint16(2, littleEndian);
  let bigTiff = false;
  let first: number;
  if (version === 42) {
    first = view.getUint32(4, littleEndian);
  } else if (version === 43) {
    bigTiff = true;
    if (bytes.length < 16) throw truncated(name, 'the end of its 16-byte BigTIFF header');
    const offsetSize = view.getUint16(4, littleEndian);
    if (offsetSize !== 8) {
      throw new ImageDecodeError(name, 'corrupt', `the BigTIFF header declares ${offsetSize}-byte offsets (8 expected)`, ADVICE_DAMAGED);
    }
    first = readUint64(view, 8, littleEndian);
  } else {
    throw new ImageDecodeError(name, 'not-an-image', `the TIFF header carries version ${version} (42 or 43 expected)`, 'choose a TIFF, PNG or JPEG image');
  }

  const container: TiffContainer = { bytes, view, littleEndian, bigTiff, directoryOffsets: [], name };
  const seen = new Set<number>();
  let offset = first;
  while (offset !== 0) {
    if (seen.has(offset)) {
      throw new ImageDecodeError(name, 'corrupt', `the chain of TIFF pages loops back to byte ${offset}`, ADVICE_DAMAGED);
    }
    if (seen.size >= MAX_PAGES) {
      throw new ImageDecodeError(name, 'corrupt', `the TIFF chains more than ${MAX_PAGES} pages`, ADVICE_DAMAGED);
    }
    seen.add(offset);
    const { next } = directoryExtent(container, offset);
    container.directoryOffsets.push(offset);
    offset = next;
  }
  if (container.directoryOffsets.length === 0) {
    throw new ImageDecodeError(name, 'empty', 'the TIFF holds no image (its first directory offset is 0)', 'choose a file that holds an image');
  }
  return container;
}

/** Entry count, entry size and the next-IFD offset of the IFD at `offset`, bounds-checked. */
function directoryExtent(tiff: TiffContainer, offset: number): { count: number; entriesAt: number; entrySize: number; next: number } {
  const { view, littleEndian: le, bigTiff, name } = tiff;
  const countSize = bigTiff ? 8 : 2;
  const entrySize = bigTiff ? 20 : 12;
  const nextSize = bigTiff ? 8 : 4;
  if (offset + countSize > view.byteLength) throw truncated(name, `the page directory at byte ${offset}`);
  const count = bigTiff ? readUint64(view, offset, le) : view.getUint16(offset, le);
  const entriesAt = offset + countSize;
  const end = entriesAt + count * entrySize + nextSize;
  if (end > view.byteLength) throw truncated(name, `the end of the page directory at byte ${offset} (${count} entries)`);
  const nextAt = entriesAt + count * entrySize;
  const next = bigTiff ? readUint64(view, nextAt, le) : view.getUint32(nextAt, le);
  return { count, entriesAt, entrySize, next };
}

/**
 * The entries of page `page`'s IFD, by tag. Entries of a type this reader does not know
 * are left out, as TIFF 6.0 asks of readers; their values are never needed for pixels.
 */
export function readTiffDirectory(tiff: TiffContainer, page: number): Map<number, TiffEntry> {
  const { view, littleEndian: le, bigTiff, name } = tiff;
  const offset = tiff.directoryOffsets[page]!;
  const { count, entriesAt, entrySize } = directoryExtent(tiff, offset);
  const inlineSize = bigTiff ? 8 : 4;
  const entries = new Map<number, TiffEntry>();
  for (let i = 0; i < count; i++) {
    const at = entriesAt + i * entrySize;
    const tag = view.getUint16(at, le);
    const type = view.getUint16(at + 2, le);
    const n = bigTiff ? readUint64(view, at + 4, le) : view.getUint32(at + 4, le);
    const size = TYPE_SIZE[type];
    if (size === undefined) continue;
    const byteCount = n * size;
    const valueAt = at + (bigTiff ? 12 : 8);
    const valueOffset =
      byteCount <= inlineSize ? valueAt : bigTiff ? readUint64(view, valueAt, le) : view.getUint32(valueAt, le);
    if (valueOffset + byteCount > view.byteLength) {
      throw truncated(name, `the values of TIFF tag ${tag} (${n} values at byte ${valueOffset})`);
    }
    entries.set(tag, { tag, type, count: n, valueOffset });
  }
  return entries;
}

/**
 * The numeric values of an entry (BYTE, SHORT, LONG, LONG8, their signed forms,
 * FLOAT, DOUBLE; RATIONAL as numerator / denominator). Throws 'corrupt' for text.
 */
export function entryNumbers(tiff: TiffContainer, entry: TiffEntry): number[] {
  const { view, littleEndian: le } = tiff;
  const out = new Array<number>(entry.count);
  const at = entry.valueOffset;
  for (let i = 0; i < entry.count; i++) {
    switch (entry.type) {
      case 1: case 7: out[i] = view.getUint8(at + i); break;
      case 6: out[i] = view.getInt8(at + i); break;
      case 3: out[i] = view.getUint16(at + 2 * i, le); break;
      case 8: out[i] = view.getInt16(at + 2 * i, le); break;
      case 4: case 13: out[i] = view.getUint32(at + 4 * i, le); break;
      case 9: out[i] = view.getInt32(at + 4 * i, le); break;
      case 11: out[i] = view.getFloat32(at + 4 * i, le); break;
      case 12: out[i] = view.getFloat64(at + 8 * i, le); break;
      case 16: case 18: out[i] = readUint64(view, at + 8 * i, le); break;
      case 17: out[i] = Number(view.getBigInt64(at + 8 * i, le)); break;
      case 5: out[i] = view.getUint32(at + 8 * i, le) / view.getUint32(at + 8 * i + 4, le); break;
      case 10: out[i] = view.getInt32(at + 8 * i, le) / view.getInt32(at + 8 * i + 4, le); break;
      default:
        throw new ImageDecodeError(tiff.name, 'corrupt', `TIFF tag ${entry.tag} holds text where numbers belong`, ADVICE_DAMAGED);
    }
  }
  return out;
}

/**
 * The text of an ASCII entry. TIFF 6.0 ASCII is 7-bit with a NUL terminator; many
 * writers put UTF-8 there, so valid UTF-8 is read as such and anything else as Latin-1.
 * Several NUL-separated strings are joined with a newline; trailing NULs and blanks
 * are dropped.
 */
export function entryText(tiff: TiffContainer, entry: TiffEntry): string {
  const raw = tiff.bytes.subarray(entry.valueOffset, entry.valueOffset + entry.count);
  const s = decodeUtf8(raw) ?? decodeLatin1(raw);
  return s.replace(/\0/g, '\n').replace(/\s+$/, '');
}
