import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { encodeTiff } from '../../../../core/image/encode-tiff';
import { gaussian, mulberry32 } from '../../../support/seeded-random';
import { runCli } from './run-cli';

const dir = mkdtempSync(join(tmpdir(), 'annula-analyze-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('annula analyze', () => {
  it('analyses a sample folder with its recorded camera and prints the documented JSON keys', async () => {
    const r = await runCli('analyze', 'samples/gold-standard', '--json', '--quiet');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(Object.keys(out)).toEqual(expect.arrayContaining(['image', 'voltageV', 'wavelengthA', 'center', 'distortion', 'rings', 'candidates', 'warnings']));
    expect(Object.keys(out)[0]).toBe('image');
    expect(Object.keys(out.image)).toEqual(expect.arrayContaining(['path', 'width', 'height', 'bitsPerSample']));
    expect(Object.keys(out.center)).toEqual(expect.arrayContaining(['xPx', 'yPx', 'sigmaPx']));
    expect(Object.keys(out.distortion)).toEqual(expect.arrayContaining(['axisRatio', 'axisRatioSigma', 'angleDeg']));
    for (const ring of out.rings) {
      expect(Object.keys(ring)).toEqual(expect.arrayContaining(['radiusPx', 'radiusSigmaPx', 'dA', 'dSigmaA', 'fwhmPx', 'intensity', 'snr', 'continuity', 'hkl', 'phase']));
    }
    expect(out.candidates[0].phase).toBe('Au');
    expect(out.warnings.join(' ')).toMatch(/nominal, not calibrated/);
  });

  it('--camera-sigma widens every d uncertainty by the camera term', async () => {
    const exact = JSON.parse((await runCli('analyze', 'samples/gold-standard', '--json', '--quiet')).stdout);
    const loose = JSON.parse((await runCli('analyze', 'samples/gold-standard', '--json', '--quiet', '--camera-sigma', '1%')).stdout);
    // At small angles d ~ lambda L / R, so a 1 % camera uncertainty adds 1 % of d in quadrature.
    loose.rings.forEach((ring: { dA: number; dSigmaA: number }, i: number) => {
      const expected = Math.hypot(exact.rings[i].dSigmaA, 0.01 * ring.dA);
      expect(Math.abs(ring.dSigmaA / expected - 1)).toBeLessThan(1e-3);
    });
  });

  it('--out writes the JSON and the two CSV tables, and refuses to overwrite them without --force', async () => {
    const first = await runCli('analyze', 'samples/tin-coating', '--out', dir, '--quiet');
    expect(first.code).toBe(0);
    const csv = readFileSync(join(dir, 'pattern.rings.csv'), 'utf8').trim().split('\n');
    expect(csv[0]).toMatch(/^ring,radiusPx,radiusSigmaPx,radiusBoundPx,dA,dSigmaA,fwhmPx/);
    expect(csv.length).toBeGreaterThanOrEqual(5);
    expect(JSON.parse(readFileSync(join(dir, 'pattern.analysis.json'), 'utf8')).candidates[0].phase).toBe('TiN');
    expect(existsSync(join(dir, 'pattern.profile.csv'))).toBe(true);
    writeFileSync(join(dir, 'pattern.rings.csv'), 'kept\n');
    const again = await runCli('analyze', 'samples/tin-coating', '--out', dir, '--quiet');
    expect(again.code).toBe(2);
    expect(again.stderr).toMatch(/already exists and was left unchanged/);
    expect(readFileSync(join(dir, 'pattern.rings.csv'), 'utf8')).toBe('kept\n');
    const forced = await runCli('analyze', 'samples/tin-coating', '--out', dir, '--force', '--quiet');
    expect(forced.code).toBe(0);
    expect(readFileSync(join(dir, 'pattern.rings.csv'), 'utf8')).not.toBe('kept\n');
  });

  it('exits 4 with the profile and a reason for an image without rings (seed 99: flat Poisson-like noise)', async () => {
    const rand = mulberry32(99);
    const width = 256;
    const data = Float32Array.from({ length: width * width }, () => Math.max(0, Math.round(500 + Math.sqrt(500) * gaussian(rand))));
    const path = join(dir, 'blank.tif');
    writeFileSync(path, encodeTiff({ width, height: width, data }));
    const r = await runCli('analyze', path, '--voltage', '200kV', '--camera-length', '1m', '--pixel-size', '14um', '--json', '--quiet');
    expect(r.code).toBe(4);
    const out = JSON.parse(r.stdout);
    expect(out.status).not.toBe('ok');
    expect(out.rings).toEqual([]);
    expect(out.candidates).toEqual([]);
    expect(r.stderr).toMatch(/no rings found/);
  });

  it('exits 3 naming the file for a corrupt image, and 2 without a camera', async () => {
    const bad = join(dir, 'corrupt.tif');
    writeFileSync(bad, new Uint8Array([0x49, 0x49, 42, 0, 8, 0, 0, 0, 1, 2, 3]));
    const r = await runCli('analyze', bad, '--voltage', '200kV', '--camera-length', '1m', '--pixel-size', '14um');
    expect(r.code).toBe(3);
    expect(r.stderr).toMatch(/corrupt\.tif/);
    const noCamera = await runCli('analyze', bad, '--voltage', '200kV');
    expect(noCamera.code).toBe(2);
    expect(noCamera.stderr).toMatch(/describe the camera/);
  });

  it('exits 3 for a folder without sample.json', async () => {
    const r = await runCli('analyze', dir, '--voltage', '200kV', '--camera-length', '1m', '--pixel-size', '14um');
    expect(r.code).toBe(3);
    expect(r.stderr).toMatch(/without a readable sample\.json/);
  });
});
