import { execFileSync } from 'node:child_process';
import { chmodSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { encode as encodePng } from 'fast-png';
import { afterAll, describe, expect, it } from 'vitest';
import { FileReadError } from '../../../../app/node/file-read-error';
import { readImageFile } from '../../../../app/node/read-image-file';
import { ImageDecodeError } from '../../../../core/image';

const dir = mkdtempSync(join(tmpdir(), 'annula-read-image-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// A 3 x 2 8-bit gray PNG written by fast-png's encoder.
const pngPath = join(dir, 'film-7.png');
const pngBytes = encodePng({ width: 3, height: 2, data: new Uint8Array([10, 20, 30, 40, 50, 60]), depth: 8, channels: 1 });
writeFileSync(pngPath, pngBytes);

async function rejection(path: string, options = {}): Promise<unknown> {
  try {
    await readImageFile(path, options);
  } catch (error) {
    return error;
  }
  throw new Error('readImageFile did not reject');
}

describe('readImageFile', () => {
  it('readImageFile(png) gives the raster, the path, the byte length and the SHA-256 coreutils computes', async () => {
    const image = await readImageFile(pngPath);
    expect(Array.from(image.raster.data)).toEqual([10, 20, 30, 40, 50, 60]);
    expect(image.path).toBe(pngPath);
    expect(image.byteLength).toBe(pngBytes.length);
    const coreutils = execFileSync('sha256sum', [pngPath], { encoding: 'utf8' }).split(' ')[0];
    expect(image.sha256).toBe(coreutils);
    expect(image.sha256).toMatch(/^[0-9a-f]{64}$/);
  });

  it('readImageFile(missing path) rejects with FileReadError missing, naming the path', async () => {
    const path = join(dir, 'no-such.tif');
    const e = (await rejection(path)) as FileReadError;
    expect(e).toBeInstanceOf(FileReadError);
    expect([e.reason, e.path]).toEqual(['missing', path]);
    expect(e.message).toBe(`${path}: no such file; check the path and the spelling of the file name`);
  });

  it('readImageFile(a folder) rejects with FileReadError directory', async () => {
    const folder = join(dir, 'session-3');
    mkdirSync(folder);
    const e = (await rejection(folder)) as FileReadError;
    expect([e.reason, e.message]).toEqual(['directory', `${folder}: this is a folder, not an image file; name the image file inside it`]);
  });

  it('readImageFile(a path through a file) rejects with FileReadError missing', async () => {
    const e = (await rejection(join(pngPath, 'inner.tif'))) as FileReadError;
    expect(e.reason).toBe('missing');
  });

  // Root reads any file whatever its mode, so this check needs an ordinary user.
  it.skipIf(process.getuid?.() === 0)('readImageFile(a file without read permission) rejects with FileReadError unreadable', async () => {
    const locked = join(dir, 'locked.png');
    writeFileSync(locked, pngBytes);
    chmodSync(locked, 0o000);
    const e = (await rejection(locked)) as FileReadError;
    expect(e.reason).toBe('unreadable');
  });

  it('readImageFile(a file above maxBytes) rejects with FileReadError too-large before reading it', async () => {
    const e = (await rejection(pngPath, { maxBytes: 10 })) as FileReadError;
    expect(e.reason).toBe('too-large');
    expect(e.message).toContain(`${pngBytes.length} bytes, more than the 10`);
  });

  it('readImageFile(a text file) rejects with ImageDecodeError not-an-image, naming the path', async () => {
    const notes = join(dir, 'notes.tif');
    writeFileSync(notes, 'camera length 1.2 m\n');
    const e = (await rejection(notes)) as ImageDecodeError;
    expect(e).toBeInstanceOf(ImageDecodeError);
    expect(e.reason).toBe('not-an-image');
    expect(e.message.startsWith(`${notes}: `)).toBe(true);
  });

  it('readImageFile passes page and maxPixels on to the decoder', async () => {
    expect(((await rejection(pngPath, { maxPixels: 5 })) as ImageDecodeError).reason).toBe('too-large');
    expect(((await rejection(pngPath, { page: 2 })) as ImageDecodeError).reason).toBe('no-such-page');
  });
});
