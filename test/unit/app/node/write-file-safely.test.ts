import { chmodSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { FileWriteError, writeFileSafely } from '../../../../app/node/write-file-safely';

const dir = mkdtempSync(join(tmpdir(), 'annula-write-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('writeFileSafely', () => {
  it('writes a new file with exactly the bytes given and leaves no temporary file', async () => {
    const path = join(dir, 'new.bin');
    await writeFileSafely(path, Uint8Array.from([1, 2, 3, 250]));
    expect([...readFileSync(path)]).toEqual([1, 2, 3, 250]);
    await writeFileSafely(join(dir, 'text.json'), '{"Å": 1}\n');
    expect(readFileSync(join(dir, 'text.json'), 'utf8')).toBe('{"Å": 1}\n');
    expect(readdirSync(dir).filter((f) => f.endsWith('.tmp'))).toEqual([]);
  });

  it("refuses to replace an existing file ('exists'), leaving it unchanged, unless overwrite is given", async () => {
    const path = join(dir, 'kept.txt');
    writeFileSync(path, 'the user saved this');
    const error = await writeFileSafely(path, 'new').catch((e: unknown) => e);
    expect(error).toBeInstanceOf(FileWriteError);
    expect((error as FileWriteError).reason).toBe('exists');
    expect((error as FileWriteError).message).toMatch(/kept\.txt: a file of that name already exists and was left unchanged; choose another name, or allow overwriting/);
    expect(readFileSync(path, 'utf8')).toBe('the user saved this');
    await writeFileSafely(path, 'replaced', { overwrite: true });
    expect(readFileSync(path, 'utf8')).toBe('replaced');
    expect(readdirSync(dir).filter((f) => f.endsWith('.tmp'))).toEqual([]);
  });

  it("says 'folder-missing' for a path in a folder that does not exist and 'not-a-file' for a folder", async () => {
    const missing = await writeFileSafely(join(dir, 'no-such-folder', 'x.tif'), 'x').catch((e: unknown) => e);
    expect((missing as FileWriteError).reason).toBe('folder-missing');
    expect((missing as FileWriteError).message).toMatch(/does not exist; create the folder first or choose another path/);
    mkdirSync(join(dir, 'a-folder'));
    const folder = await writeFileSafely(join(dir, 'a-folder'), 'x', { overwrite: true }).catch((e: unknown) => e);
    expect((folder as FileWriteError).reason).toBe('not-a-file');
  });

  it.skipIf(process.getuid?.() === 0)("says 'unwritable' for a folder without write permission", async () => {
    const locked = join(dir, 'locked');
    mkdirSync(locked);
    chmodSync(locked, 0o500);
    const error = await writeFileSafely(join(locked, 'x.tif'), 'x').catch((e: unknown) => e);
    chmodSync(locked, 0o700);
    expect((error as FileWriteError).reason).toBe('unwritable');
  });

  it('refuses an empty path with a TypeError', async () => {
    await expect(writeFileSafely('', 'x')).rejects.toThrow(/path must be a non-empty string/);
  });
});
