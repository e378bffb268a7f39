/**
 * Helpers for the report tests that read Annula's PDF through Debian's
 * poppler-utils: whether a tool is installed (a missing one fails the test
 * under ANNULA_REQUIRE_REFERENCE=1, as in CI), and the binary Netpbm images
 * pdftoppm writes (P5 grey with -gray, P6 colour otherwise; maxval 255,
 * Netpbm format specification, netpbm.sourceforge.net/doc/pgm.html and ppm.html).
 */
import { spawnSync } from 'node:child_process';

/** Whether `name` runs; throws instead when ANNULA_REQUIRE_REFERENCE=1 and it does not. */
export function hasReferenceTool(name: string, install = 'apt-get install -y poppler-utils'): boolean {
  const ok = spawnSync(name, ['-v'], { stdio: 'ignore' }).error === undefined;
  if (!ok && process.env.ANNULA_REQUIRE_REFERENCE === '1') throw new Error(`reference tool missing: ${name} (${install})`);
  return ok;
}

export interface NetpbmImage {
  width: number;
  height: number;
  /** 1 for P5 (grey), 3 for P6 (RGB). */
  channels: 1 | 3;
  /** Samples row by row, `channels` per pixel. */
  data: Uint8Array;
}

/** A binary PGM (P5) or PPM (P6) with maxval 255. @throws Error for any other kind */
export function readNetpbm(bytes: Uint8Array): NetpbmImage {
  let pos = 0;
  const space = (b: number | undefined): boolean => b === 0x20 || b === 0x0a || b === 0x0d || b === 0x09;
  const token = (): string => {
    while (space(bytes[pos])) pos++;
    let s = '';
    while (pos < bytes.length && !space(bytes[pos])) s += String.fromCharCode(bytes[pos++]!);
    return s;
  };
  const magic = token();
  if (magic !== 'P5' && magic !== 'P6') throw new Error(`not a binary PGM or PPM (magic ${JSON.stringify(magic)})`);
  const channels = magic === 'P5' ? 1 : 3;
  const width = Number(token());
  const height = Number(token());
  if (Number(token()) !== 255) throw new Error('Netpbm maxval is not 255');
  pos++; // the single whitespace before the samples
  return { width, height, channels, data: bytes.subarray(pos, pos + channels * width * height) };
}
