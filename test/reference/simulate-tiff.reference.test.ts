/**
 * The TIFF writer against independent readers: tifffile (Debian's python3-tifffile) and
 * Pillow (python3-pil) read files encodeTiff wrote from simulated images and must return
 * exactly the same samples, the ImageDescription, Software and resolution.
 */
import { createHash } from 'node:crypto';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { findPhase } from '../../core/crystal';
import { encodeTiff } from '../../core/image/encode-tiff';
import { simulatePattern, simulationDescription, type SimulationSpec } from '../../core/simulate';
import { referenceAvailable, runPythonJson } from './python-reference';

const dir = mkdtempSync(join(tmpdir(), 'annula-tiff-ref-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const spec: SimulationSpec = {
  widthPx: 301,
  heightPx: 203,
  voltageV: 200e3,
  cameraLengthPx: 9000,
  frame: { centerXPx: 140.2, centerYPx: 96.7, axisRatio: 1.03, angleDeg: 20 },
  phases: [{ phase: findPhase('Au')! }],
  peakCounts: 3000,
  ringFwhmPx: 2,
  // No background and offset 0 with read noise put pixels at 0; the bare direct beam saturates at 65535.
  background: null,
  detector: { offsetAdu: 0, readNoiseAdu: 3, gainAduPerElectron: 1.5 },
  hotPixels: { count: 7 },
  seed: 20240611,
  scenario: 'reference check of the TIFF writer: d = 2.355 Å ring (invented)',
};

function sha256(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

interface PythonRead {
  shape: number[];
  dtype: string;
  sha256: string;
  description: string;
  software: string;
  xResolution: [number, number];
  yResolution: [number, number];
  resolutionUnit: number;
  compression: number;
  byteorder: string;
  pillowMode?: string;
  pillowSha256?: string;
  firstRow: number[];
}

const READ = `
import hashlib, numpy as np, tifffile
with tifffile.TiffFile(INPUT["path"]) as tif:
    page = tif.pages[0]
    a = page.asarray()
    tags = page.tags
    out = {
        "shape": list(a.shape), "dtype": str(a.dtype), "byteorder": tif.byteorder,
        "sha256": hashlib.sha256(a.astype(a.dtype.newbyteorder("<")).tobytes()).hexdigest(),
        "description": page.description, "software": tags["Software"].value,
        "xResolution": list(tags["XResolution"].value), "yResolution": list(tags["YResolution"].value),
        "resolutionUnit": int(tags["ResolutionUnit"].value), "compression": int(page.compression),
        "firstRow": a[0].tolist(),
    }
if INPUT["pillow"]:
    from PIL import Image
    im = Image.open(INPUT["path"])
    out["pillowMode"] = im.mode
    out["pillowSha256"] = hashlib.sha256(np.array(im).astype("<u2").tobytes()).hexdigest()
print(json.dumps(out))
`;

describe.runIf(referenceAvailable('tifffile', 'PIL', 'numpy'))('encodeTiff read back by tifffile and Pillow', () => {
  it('a simulated uint16 image (seed 20240611) comes back from tifffile and Pillow with every sample, the description and the resolution', () => {
    const { raster, truth } = simulatePattern(spec);
    expect(truth.saturated.pixelCount).toBeGreaterThan(0);
    expect(truth.clippedLowPixelCount).toBeGreaterThan(0);
    const description = simulationDescription(truth, 'gold.truth.json');
    const bytes = encodeTiff(raster, { description, software: 'annula simulate', rowsPerStrip: 16, resolution: { xPerUnit: 0.01 / 14e-6, yPerUnit: 0.01 / 14e-6, unit: 'cm' } });
    const path = join(dir, 'gold.tif');
    writeFileSync(path, bytes);
    const samples = Uint16Array.from(raster.data);
    const ref = runPythonJson<PythonRead>(READ, { path, pillow: true });
    expect(ref.shape).toEqual([203, 301]);
    expect(ref.dtype).toBe('uint16');
    expect(ref.byteorder).toBe('<');
    expect(ref.compression).toBe(1);
    expect(ref.sha256).toBe(sha256(new Uint8Array(samples.buffer)));
    expect(ref.firstRow).toEqual(Array.from(samples.subarray(0, 301)));
    expect(ref.pillowMode).toBe('I;16');
    expect(ref.pillowSha256).toBe(ref.sha256);
    expect(ref.description).toBe(description);
    expect(JSON.parse(ref.description).scenario).toBe(spec.scenario);
    expect(ref.software).toBe('annula simulate');
    expect(ref.xResolution).toEqual([5000, 7]);
    expect(ref.yResolution).toEqual([5000, 7]);
    expect(ref.resolutionUnit).toBe(3);
  });

  it('a float32 image (unrounded expected values) comes back from tifffile bit for bit', () => {
    const { raster } = simulatePattern({ ...spec, widthPx: 97, heightPx: 61, noise: false, output: 'float32' });
    const path = join(dir, 'expected.tif');
    writeFileSync(path, encodeTiff(raster, { sampleFormat: 'float32', description: 'expected counts', software: 'annula simulate' }));
    const ref = runPythonJson<PythonRead>(READ, { path, pillow: false });
    expect(ref.dtype).toBe('float32');
    expect(ref.shape).toEqual([61, 97]);
    expect(ref.sha256).toBe(sha256(new Uint8Array(raster.data.buffer, raster.data.byteOffset, raster.data.byteLength)));
    expect(ref.description).toBe('expected counts');
    expect(ref.resolutionUnit).toBe(1);
  });

  it('a deflated uint16 image with the horizontal predictor comes back from tifffile with every sample', () => {
    const { raster } = simulatePattern(spec);
    const path = join(dir, 'gold-deflate.tif');
    const bytes = encodeTiff(raster, { compression: 'deflate', rowsPerStrip: 7, description: 'deflated', software: 'annula simulate' });
    writeFileSync(path, bytes);
    const ref = runPythonJson<PythonRead & { predictor: number }>(READ.replace('"firstRow": a[0].tolist(),', '"firstRow": a[0].tolist(), "predictor": int(tags["Predictor"].value),'), { path, pillow: false });
    expect(ref.compression).toBe(8); // Adobe deflate (TIFF Technical Note 2)
    expect(ref.predictor).toBe(2); // horizontal differencing (TIFF 6.0 section 14)
    expect(ref.sha256).toBe(sha256(new Uint8Array(Uint16Array.from(raster.data).buffer)));
    expect(bytes.length).toBeLessThan(raster.data.length * 2);
  });
});
