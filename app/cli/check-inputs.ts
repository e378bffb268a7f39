/**
 * The images a `check` runs on: image files, sample folders (holding sample.json), plain
 * folders (their image files and sample folders, not recursing further) and glob patterns
 * (tinyglobby), in the order given, each image once.
 */
import { readdir, stat } from 'node:fs/promises';
import { extname, join } from 'node:path';
import { glob, isDynamicPattern } from 'tinyglobby';
import { resolveImageInput, type ImageInput } from './image-analysis';

/** File extensions taken as images in a folder or a glob's matches. */
export const IMAGE_EXTENSIONS = ['.tif', '.tiff', '.png', '.jpg', '.jpeg'];

/** One image to check, or an argument that named none (reported, and the batch goes on). */
export type CheckInput = { ok: true; input: ImageInput } | { ok: false; argument: string; reason: string };

async function kindOf(path: string): Promise<'folder' | 'file' | null> {
  try {
    return (await stat(path)).isDirectory() ? 'folder' : 'file';
  } catch {
    return null;
  }
}

async function isSampleFolder(path: string): Promise<boolean> {
  return (await kindOf(join(path, 'sample.json'))) === 'file';
}

const isImageName = (name: string): boolean => IMAGE_EXTENSIONS.includes(extname(name).toLowerCase());

/** A folder: itself when it is a sample folder, else its image files and sample folders, sorted by name. */
async function folderInputs(folder: string): Promise<CheckInput[]> {
  if (await isSampleFolder(folder)) return [{ ok: true, input: await resolveImageInput(folder) }];
  const entries = (await readdir(folder, { withFileTypes: true })).sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
  const found: CheckInput[] = [];
  for (const e of entries) {
    const path = join(folder, e.name);
    if (e.isDirectory() && (await isSampleFolder(path))) found.push({ ok: true, input: await resolveImageInput(path) });
    else if (e.isFile() && isImageName(e.name)) found.push({ ok: true, input: await resolveImageInput(path) });
  }
  if (found.length === 0) return [{ ok: false, argument: folder, reason: `${folder} holds no image (${IMAGE_EXTENSIONS.join(', ')}) and no sample folder` }];
  return found;
}

/**
 * Expands the arguments of `check`.
 * @returns the inputs, and whether they make a batch (more than one image, or a folder or glob that could have held several)
 * @throws InputError for a sample folder without a readable sample.json
 */
export async function expandCheckArguments(args: readonly string[]): Promise<{ inputs: CheckInput[]; batch: boolean }> {
  const inputs: CheckInput[] = [];
  let batch = args.length > 1;
  for (const arg of args) {
    const kind = await kindOf(arg);
    if (kind === 'file') {
      inputs.push({ ok: true, input: await resolveImageInput(arg) });
    } else if (kind === 'folder') {
      if (!(await isSampleFolder(arg))) batch = true;
      inputs.push(...(await folderInputs(arg)));
    } else if (isDynamicPattern(arg)) {
      batch = true;
      const matches = (await glob(arg, { onlyFiles: false, expandDirectories: false })).sort();
      const before = inputs.length;
      for (const m of matches) {
        const k = await kindOf(m);
        if (k === 'folder' && (await isSampleFolder(m))) inputs.push({ ok: true, input: await resolveImageInput(m) });
        else if (k === 'file' && isImageName(m)) inputs.push({ ok: true, input: await resolveImageInput(m) });
      }
      if (inputs.length === before) inputs.push({ ok: false, argument: arg, reason: `no image or sample folder matches "${arg}"` });
    } else {
      inputs.push({ ok: false, argument: arg, reason: `${arg} does not exist; check the path` });
    }
  }
  // Each image once (a glob and a folder may both name it).
  const seen = new Set<string>();
  const unique = inputs.filter((x) => {
    if (!x.ok) return true;
    if (seen.has(x.input.imagePath)) return false;
    seen.add(x.input.imagePath);
    return true;
  });
  return { inputs: unique, batch: batch || unique.length > 1 };
}
