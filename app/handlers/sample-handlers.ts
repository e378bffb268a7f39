/** The bundled demo samples: samples/<id>/sample.json beside its image. */
import { readdir, readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { z } from 'zod';
import type { SampleSummary } from './contract';
import { defineHandler } from './handler';
import { HandlerError } from './handler-error';
import { fileMeta } from './image-file-meta';

const sampleJsonSchema = z.object({
  title: z.string(),
  scenario: z.string().default(''),
  image: z.string().regex(/^[^/\\]+$/, 'a file name inside the sample folder'),
  camera: z.object({ voltage: z.string(), cameraLength: z.string(), pixelSize: z.string() }).optional(),
  expected: z.object({ phase: z.string(), aA: z.number() }).loose().optional(),
});

/** A sample id is a folder name: letters, digits and dashes, so it can never leave samples/. */
const sampleId = z.string().regex(/^[a-z0-9][a-z0-9-]{0,63}$/, 'a sample folder name such as "gold-standard"');

async function readSampleJson(samplesDir: string, id: string): Promise<{ summary: SampleSummary; image: string }> {
  const file = join(samplesDir, id, 'sample.json');
  let text: string;
  try {
    text = await readFile(file, 'utf8');
  } catch {
    throw new HandlerError('not-found', `there is no sample "${id}"`, 'choose one of the bundled samples');
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (e) {
    throw new HandlerError('unreadable', `${file} is not valid JSON (${(e as Error).message})`, 'restore the sample from the repository');
  }
  const parsed = sampleJsonSchema.safeParse(json);
  if (!parsed.success) {
    const why = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ');
    throw new HandlerError('unreadable', `${file} is not a sample description (${why})`, 'restore the sample from the repository');
  }
  const s = parsed.data;
  return {
    summary: { id, title: s.title, scenario: s.scenario, camera: s.camera ?? null, expected: s.expected ? { phase: s.expected.phase, aA: s.expected.aA } : null },
    image: s.image,
  };
}

export const listSamples = defineHandler({
  name: 'list-samples',
  summary: 'the bundled demo samples, by folder name',
  input: z.strictObject({}),
  async run(_input, context) {
    let names: string[];
    try {
      names = (await readdir(context.samplesDir, { withFileTypes: true })).filter((d) => d.isDirectory()).map((d) => d.name).sort();
    } catch {
      throw new HandlerError('not-found', `the samples folder ${context.samplesDir} is missing`, 'reinstall Annula, or open your own image');
    }
    const samples: SampleSummary[] = [];
    for (const name of names) {
      if (!sampleId.safeParse(name).success) continue;
      try {
        samples.push((await readSampleJson(context.samplesDir, name)).summary);
      } catch (e) {
        if (!(e instanceof HandlerError && e.code === 'not-found')) throw e; // a folder without sample.json is not a sample
      }
    }
    return samples;
  },
});

export const readSample = defineHandler({
  name: 'read-sample',
  summary: "one sample's image bytes and camera settings",
  input: z.strictObject({ id: sampleId }),
  async run({ id }, context) {
    const { summary, image } = await readSampleJson(context.samplesDir, id);
    let bytes: Uint8Array;
    try {
      const buffer = await readFile(join(context.samplesDir, id, image));
      bytes = new Uint8Array(buffer.buffer, buffer.byteOffset, buffer.byteLength);
    } catch {
      throw new HandlerError('not-found', `the image ${image} of sample "${id}" is missing`, 'restore the sample from the repository');
    }
    return { meta: { ...fileMeta(image, bytes), sample: summary }, bytes };
  },
});
