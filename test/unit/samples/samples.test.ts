/**
 * Every demo sample, analysed as a user would, against the simulator's truth
 * (samples/<name>/pattern.truth.json) and the expected phase of its sample.json.
 * The tolerances are the accuracy targets of the measuring issue where they apply:
 * centre within 0.05 px, axis ratio within 5e-4, strong-ring radii within 0.02 px.
 */
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { phaseLibrary } from '../../../core/crystal';
import { analyze } from '../../../core/pipeline';
import { cameraLengthPxFromPhysical } from '../../../core/physics';
import { parseQuantity } from '../../../app/common/quantity';
import { loadOpenCv } from '../../../app/node/load-opencv';
import { readImageFile } from '../../../app/node/read-image-file';

const SAMPLES = 'samples';
// Folders with one pattern and its sample.json; the QA batch (qa-batch/, batch.json) has its own test, qa-samples.test.ts.
const folders = readdirSync(SAMPLES).filter((f) => statSync(join(SAMPLES, f)).isDirectory() && existsSync(join(SAMPLES, f, 'sample.json')));

describe('demo samples', () => {
  it('exist', () => {
    expect(folders).toEqual(expect.arrayContaining(['gold-standard', 'tin-coating']));
  });

  for (const folder of folders) {
    it(`${folder}: analysis finds the expected phase and the truth's geometry`, async () => {
      const sample = JSON.parse(readFileSync(join(SAMPLES, folder, 'sample.json'), 'utf8'));
      const truth = JSON.parse(readFileSync(join(SAMPLES, folder, 'pattern.truth.json'), 'utf8'));
      const image = await readImageFile(join(SAMPLES, folder, sample.image));
      const voltageV = parseQuantity(sample.camera.voltage, 'voltage', 'voltage');
      const cameraLengthPx = cameraLengthPxFromPhysical(
        parseQuantity(sample.camera.cameraLength, 'length', 'cameraLength'),
        parseQuantity(sample.camera.pixelSize, 'length', 'pixelSize'),
      );
      const result = analyze(
        image.raster,
        { camera: { voltageV, cameraLengthPx, cameraLengthSigmaPx: 0, source: 'sample.json', calibrated: false }, image: image.info, phases: phaseLibrary() },
        undefined,
        loadOpenCv(),
      );
      expect(result.status).toBe('ok');
      expect(result.conclusion.conclusive).toBe(true);
      expect(Math.hypot(result.center.xPx - truth.frame.centerXPx, result.center.yPx - truth.frame.centerYPx)).toBeLessThan(0.05);
      expect(Math.abs(result.distortion.axisRatio - truth.frame.axisRatio)).toBeLessThan(5e-4);
      // Strong rings (SNR > 100) within 0.02 px of a true ring radius.
      const trueRadii: number[] = truth.rings.map((r: { radiusPx: number }) => r.radiusPx);
      const strong = result.rings.filter((r) => r.snr > 100);
      expect(strong.length).toBeGreaterThanOrEqual(3);
      for (const r of strong) expect(Math.min(...trueRadii.map((t) => Math.abs(t - r.radiusPx)))).toBeLessThan(0.02);
      const best = result.candidates[0]!;
      expect(best.phase).toBe(sample.expected.phase);
      expect(Math.abs(best.aA - sample.expected.aA) / sample.expected.aA).toBeLessThan(1e-4);
    });
  }
});
