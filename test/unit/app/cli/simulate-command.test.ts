import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeImage } from '../../../../core/image';
import { cameraLengthPxFromPhysical, electronWavelengthA, ringRadiusPx } from '../../../../core/physics';
import { progressReporter } from '../../../../app/cli/commands/simulate';
import { runCli } from './run-cli';

const dir = mkdtempSync(join(tmpdir(), 'annula-simulate-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const camera = ['--voltage', '200kV', '--camera-length', '150mm', '--pixel-size', '14um'];

describe('annula simulate', () => {
  it('--phase Au --size 256 --out gold.tif writes the 16-bit TIFF and gold.truth.json beside it', async () => {
    const out = join(dir, 'gold.tif');
    const r = await runCli('simulate', '--phase', 'Au', ...camera, '--size', '256', '--seed', '5', '--hot-pixels', '3', '--out', out);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/256 x 256 px, Au, 200 kV/);
    expect(r.stdout).toMatch(/wrote .*gold\.tif and .*gold\.truth\.json/);
    const truth = JSON.parse(readFileSync(join(dir, 'gold.truth.json'), 'utf8'));
    const { raster, info } = decodeImage(new Uint8Array(readFileSync(out)));
    expect([raster.width, raster.height, info.bitsPerSample, info.sampleFormat]).toEqual([256, 256, 16, 'uint']);
    expect(truth.seed).toBe(5);
    expect(truth.cameraLengthPx).toBe(cameraLengthPxFromPhysical(0.15, 14e-6));
    expect(truth.frame).toEqual({ centerXPx: 127.5, centerYPx: 127.5, axisRatio: 1, angleDeg: 0 });
    expect(truth.rings[0].radiusPx).toBe(ringRadiusPx(truth.rings[0].dA, { wavelengthA: electronWavelengthA(200e3), cameraLengthPx: truth.cameraLengthPx }));
    expect(truth.hotPixels).toHaveLength(3);
    for (const h of truth.hotPixels) expect(raster.data[h.yPx * 256 + h.xPx]).toBe(h.adu);
    // The description names the truth file; the resolution is the pixel pitch (1 cm / 14 µm = 714.29 per cm).
    expect(JSON.parse(info.text.ImageDescription!)).toMatchObject({ simulator: 'annula simulate', truthFile: 'gold.truth.json', seed: 5 });
    expect(info.resolution!.unit).toBe('cm');
    expect(info.resolution!.xPerUnit).toBeCloseTo(0.01 / 14e-6, 9);
  });

  it('refuses to overwrite either file without --force (exit 2, files unchanged) and replaces both with it', async () => {
    const out = join(dir, 'kept.tif');
    writeFileSync(join(dir, 'kept.truth.json'), 'mine');
    const r = await runCli('simulate', '--phase', 'Au', ...camera, '--size', '64', '--out', out);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/kept\.truth\.json already exists and was left unchanged; choose another --out, or add --force to replace it/);
    expect(existsSync(out)).toBe(false);
    expect(readFileSync(join(dir, 'kept.truth.json'), 'utf8')).toBe('mine');
    const forced = await runCli('simulate', '--phase', 'Au', ...camera, '--size', '64', '--out', out, '--force');
    expect(forced.code, forced.stderr).toBe(0);
    expect(JSON.parse(readFileSync(join(dir, 'kept.truth.json'), 'utf8')).format).toBe('annula-simulation-truth');
  });

  it('--json prints the truth as written; a mixture, distortion, centre, texture, grains and float32 reach the truth', async () => {
    const out = join(dir, 'mix.tif');
    const r = await runCli(
      'simulate', '--phase', 'Au', '--phase', 'Si:0.3', ...camera, '--width', '200', '--height', '150', '--center', '-20.5,70',
      '--axis-ratio', '1.02', '--axis-angle', '200deg', '--ring-fwhm', '2.5px', '--eta', '0.3', '--peak-counts', '800', '--texture', '0.4',
      '--texture-angle', '30', '--grains', '40', '--no-beam-stop', '--no-noise', '--float32', '--seed', '7', '--scenario', 'an invented film', '--json', '--out', out,
    );
    expect(r.code, r.stderr).toBe(0);
    const truth = JSON.parse(r.stdout);
    expect(truth).toEqual(JSON.parse(readFileSync(join(dir, 'mix.truth.json'), 'utf8')));
    expect(truth.phases.map((p: { id: string; weight: number }) => [p.id, p.weight])).toEqual([['Au', 1], ['Si', 0.3]]);
    expect(truth.frame).toEqual({ centerXPx: -20.5, centerYPx: 70, axisRatio: 1.02, angleDeg: 20 });
    expect(truth.image).toEqual({ widthPx: 200, heightPx: 150, sampleFormat: 'float32', supersampling: 3 });
    expect([truth.ringFwhmPx, truth.ringEta, truth.peakCounts, truth.beamStop, truth.detector.noise]).toEqual([2.5, 0.3, 800, null, false]);
    expect(truth.phases[0].texture).toMatchObject({ shape: 'cosine', amplitude: 0.4, azimuthDeg: 30 });
    expect(truth.rings[0].spots).toHaveLength(40);
    expect(truth.scenario).toBe('an invented film');
    expect(decodeImage(new Uint8Array(readFileSync(out))).info.sampleFormat).toBe('float');
  });

  it('exits 2 naming the flag for a bad unit, a bad number, an unknown phase or a missing --out', async () => {
    const out = join(dir, 'bad.tif');
    const cases: [string[], RegExp][] = [
      [['--phase', 'Au', '--voltage', '200', '--camera-length', '1m', '--pixel-size', '14um', '--out', out], /--voltage: "200" has no unit/],
      [['--phase', 'Au', '--voltage', '200kV', '--camera-length', '1kV', '--pixel-size', '14um', '--out', out], /--camera-length: "1kV" is not a length/],
      [['--phase', 'Au', ...camera, '--ring-fwhm', '-1', '--out', out], /--ring-fwhm: -1 must be >= 0.5/],
      [['--phase', 'Au', ...camera, '--size', '12.5', '--out', out], /--size: "12.5" must be a whole number/],
      [['--phase', 'Au', ...camera, '--axis-ratio', 'wide', '--out', out], /--axis-ratio: "wide" is not a number/],
      [['--phase', 'Au', ...camera, '--center', '10', '--out', out], /--center: "10" is not x,y in px/],
      [['--phase', 'Unobtainium', ...camera, '--out', out], /no phase "Unobtainium" in the library/],
      [['--phase', 'Au:-1', ...camera, '--out', out], /--phase Au \(weight\): -1 must be > 0/],
      [[...camera, '--out', out], /name at least one phase/],
      [['--phase', 'Au', ...camera, '--out', join(dir, 'bad.png')], /--out: ".*bad\.png" must end in \.tif or \.tiff/],
      [['--phase', 'Au', ...camera], /required option '--out <file.tif>' not specified/],
      [['--phase', 'Au', '--voltage', '200kV', '--out', out], /describe the camera/],
    ];
    for (const [args, message] of cases) {
      const r = await runCli('simulate', ...args);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stderr).toMatch(message);
    }
    expect(existsSync(out)).toBe(false);
  });

  it('exits 2 for an output folder that does not exist, saying so', async () => {
    const r = await runCli('simulate', '--phase', 'Au', ...camera, '--size', '32', '--out', join(dir, 'nowhere', 'x.tif'));
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/the folder .*nowhere does not exist; create the folder first/);
  });

  it('progressReporter prints each tenth once on stderr, and nothing during the first second', () => {
    const lines: string[] = [];
    let clock = 0;
    const report = progressReporter({ out: () => undefined, err: (t) => lines.push(t) }, () => clock);
    report(0.3);
    clock = 1500;
    for (const f of [0.31, 0.35, 0.42, 0.42, 0.99, 1]) report(f);
    expect(lines).toEqual(['annula simulate: 30%', 'annula simulate: 40%', 'annula simulate: 90%', 'annula simulate: 100%']);
  });
});
