/// <reference lib="dom" />
/**
 * The calibration and check flows in Chromium against the real `annula serve` with a
 * temporary lab store: calibrate on samples/gold-standard and save (a second save under
 * the same name is refused), reload and find it, check two QA films (the verdicts
 * samples/README.md states), export the PDF report, the CSV ring table and the PNG of the
 * pattern with its overlays and verify the files. Screenshots at 1280 x 800 and 1920 x 1080, dark and light, go to test/e2e/artifacts/.
 */
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { mkdir, mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { decode } from 'fast-png';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromiumAvailable, launchChromium } from './support/chromium';
import { assertRendererBuilt } from './support/renderer-build';
import { startServe, type ServeProcess } from './support/serve-process';
import { ARTIFACTS_DIR, shootStates, SIZES } from './support/screenshots';

const root = resolve(import.meta.dirname, '..', '..');
const artifacts = ARTIFACTS_DIR;
const TIMEOUT = 90_000;
const CALIBRATION = 'TEM-2 gold e2e';

describe.runIf(chromiumAvailable())('calibration and check flows in Chromium against annula serve', () => {
  let serve: ServeProcess;
  let browser: Browser;
  let page: Page;
  let downloads: string;
  const pageErrors: string[] = [];
  const cspViolations: string[] = [];

  async function idle(): Promise<void> {
    await page.getByTestId('progress').waitFor({ state: 'detached', timeout: TIMEOUT });
  }

  const shoot = (state: string): Promise<void> => shootStates(page, state);

  async function openFile(path: string): Promise<void> {
    await page.getByTestId('view-answer').click(); // the ring table is in the Result view
    await page.getByTestId('image-input').setInputFiles(path);
    await page.getByTestId('open-file').filter({ hasText: path.split('/').pop()! }).waitFor({ timeout: TIMEOUT });
    await page.getByTestId('ring-row').first().waitFor({ timeout: TIMEOUT });
    await idle();
  }

  async function download(testid: string): Promise<string> {
    const [d] = await Promise.all([page.waitForEvent('download', { timeout: TIMEOUT }), page.getByTestId(testid).click()]);
    const path = join(downloads, d.suggestedFilename());
    expect(existsSync(path)).toBe(false); // every download gets a fresh name
    await d.saveAs(path);
    return path;
  }

  beforeAll(async () => {
    assertRendererBuilt();
    await mkdir(artifacts, { recursive: true });
    downloads = await mkdtemp(join(tmpdir(), 'annula-e2e-downloads-'));
    serve = await startServe();
    browser = await launchChromium();
    const context = await browser.newContext({ viewport: SIZES[0]!, acceptDownloads: true });
    page = await context.newPage();
    page.on('pageerror', (e) => pageErrors.push(e.message));
    page.on('console', (m) => {
      if (/Content Security Policy/i.test(m.text())) cspViolations.push(m.text());
    });
  }, 120_000);

  afterAll(async () => {
    await browser?.close();
    await serve?.stop();
    if (downloads) await rm(downloads, { recursive: true, force: true });
  });

  it('calibrates on samples/gold-standard, shows each ring residual, and saves it', async () => {
    await page.goto(serve.url);
    await page.getByTestId('best-candidate').filter({ hasText: /Au/ }).waitFor({ timeout: TIMEOUT });
    await idle();
    await page.getByTestId('view-calibrate').click();
    await page.getByTestId('standard-phase').selectOption('Au');
    await page.getByTestId('run-calibration').click();
    await page.getByTestId('calibration-fit').waitFor({ timeout: TIMEOUT });
    const rows = await page.getByTestId('residual-row').allTextContents();
    expect(rows.length).toBeGreaterThanOrEqual(5);
    expect(rows[0]).toMatch(/^1 1 1/);
    // The simulator's true camera, samples/gold-standard/pattern.truth.json.
    const truth = JSON.parse(await readFile(resolve(root, 'samples/gold-standard/pattern.truth.json'), 'utf8')) as { cameraLengthPx: number };
    const fitText = (await page.getByTestId('calibration-fit').textContent()) ?? '';
    const lp = Number(/L\/p\s*([\d.]+)/.exec(fitText)?.[1]);
    const trueLp = truth.cameraLengthPx;
    expect(trueLp).toBeGreaterThan(0);
    expect(Math.abs(lp / trueLp - 1)).toBeLessThan(2e-4); // issue 4: within 0.02 % on the clean standard
    await page.getByTestId('calibration-name').fill(CALIBRATION);
    await page.getByTestId('save-calibration').click();
    await page.getByTestId('calibration-saved').filter({ hasText: CALIBRATION }).waitFor({ timeout: 30_000 });
    await page.getByTestId('history-row').filter({ hasText: CALIBRATION }).waitFor();
    await shoot('calibration-saved');
    // The same name again is refused and nothing is replaced.
    await page.getByTestId('save-calibration').click();
    await page.getByTestId('calibration-error').filter({ hasText: /already exists/ }).waitFor({ timeout: 30_000 });
    expect(await page.getByTestId('history-row').filter({ hasText: CALIBRATION }).count()).toBe(1);
    await shoot('calibration-duplicate-refused');
    expect(pageErrors).toEqual([]);
  }, TIMEOUT * 3);

  it('finds the calibration still there after a reload', async () => {
    await page.reload();
    await page.getByTestId('best-candidate').filter({ hasText: /Au/ }).waitFor({ timeout: TIMEOUT });
    await idle();
    await page.getByTestId('view-calibrate').click();
    await page.getByTestId('history-row').filter({ hasText: CALIBRATION }).waitFor({ timeout: 30_000 });
    expect(await page.getByTestId('calibration').locator('option', { hasText: CALIBRATION }).count()).toBe(1);
  }, TIMEOUT * 2);

  it('checks CV-TIN-0412 (pass) and CV-TIN-0414 (fail by lattice constant) and shows the control chart', async () => {
    // samples/README.md, the QA batch: 0412 pass, 0414 fail by lattice constant (a +1.5 %).
    await openFile(resolve(root, 'samples/qa-batch/CV-TIN-0412.tif'));
    await page.getByTestId('view-check').click();
    await page.getByTestId('expected-phase').selectOption('TiN');
    await page.getByTestId('tolerance').fill('0.5%');
    await page.getByTestId('check-calibration').selectOption(CALIBRATION);
    await page.getByTestId('run-check').click();
    const verdict = page.getByTestId('verdict');
    await verdict.waitFor({ timeout: TIMEOUT });
    const pass = (await verdict.textContent()) ?? '';
    expect(pass).toMatch(/^\s*PASS/);
    expect(pass).toContain('CV-TIN-0412');
    await page.getByTestId('check-recorded').filter({ hasText: /Recorded in the lab store/ }).waitFor({ timeout: 30_000 });
    await page.getByTestId('control-chart').waitFor({ timeout: 30_000 });
    await shoot('check-pass');

    await openFile(resolve(root, 'samples/qa-batch/CV-TIN-0414.tif'));
    await page.getByTestId('view-check').click();
    await page.getByTestId('run-check').click();
    await verdict.waitFor({ timeout: TIMEOUT });
    const fail = (await verdict.textContent()) ?? '';
    expect(fail).toMatch(/^\s*FAIL/);
    expect(fail).toContain('CV-TIN-0414');
    const measured = Number(/a = ([\d.]+)\(/.exec(fail)?.[1]);
    const batch = JSON.parse(await readFile(resolve(root, 'samples/qa-batch/batch.json'), 'utf8')) as { films: Array<{ image: string; expected: { aA: number } }> };
    const expectedA = batch.films.find((f) => f.image === 'CV-TIN-0414.tif')!.expected.aA;
    expect(Math.abs(measured / expectedA - 1)).toBeLessThan(5e-4);
    await page.getByTestId('check-recorded').filter({ hasText: /Recorded in the lab store/ }).waitFor({ timeout: 30_000 });
    await expect.poll(() => page.getByTestId('control-chart').locator('svg').count(), { timeout: 30_000 }).toBe(1);
    await expect.poll(async () => (await page.locator('h2#chart-title').textContent()) ?? '', { timeout: 30_000 }).toContain('2 recorded');
    await shoot('check-fail');
    expect(pageErrors).toEqual([]);
    expect(cspViolations).toEqual([]);
  }, TIMEOUT * 4);

  it('exports the PDF report and the CSV ring table, and the files are right', async () => {
    const pdf = await download('export-pdf');
    const bytes = await readFile(pdf);
    expect(bytes.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    const prefix = join(downloads, 'page');
    execFileSync('pdftoppm', ['-png', '-r', '40', '-f', '1', '-l', '1', pdf, prefix]);
    const pngName = ['page-1.png', 'page-01.png', 'page-001.png'].map((n) => join(downloads, n)).find((p) => existsSync(p))!;
    const image = decode(await readFile(pngName));
    const channels = image.channels;
    let sum = 0;
    let sum2 = 0;
    const n = image.width * image.height;
    for (let i = 0; i < n; i++) {
      const v = Number(image.data[i * channels]);
      sum += v;
      sum2 += v * v;
    }
    const sd = Math.sqrt(sum2 / n - (sum / n) ** 2);
    expect(sd).toBeGreaterThan(10); // not a blank page
    await page.getByTestId('export-notice').filter({ hasText: /report/ }).waitFor();

    await page.getByTestId('view-answer').click();
    const csv = await download('export-csv');
    const lines = (await readFile(csv, 'utf8')).trim().split(/\r?\n/);
    const rings = await page.getByTestId('ring-row').count();
    expect(lines[0]!.split(',')[0]).toBe('ring');
    expect(lines.length - 1).toBe(rings);
    expect(rings).toBeGreaterThanOrEqual(5);
    const second = await download('export-csv');
    expect(second).not.toBe(csv);
    await shoot('exported');
  }, TIMEOUT * 2);

  it('exports the PNG of the pattern with its overlays: a real PNG, the size of the image, not blank', async () => {
    const tif = resolve(root, 'samples/qa-batch/CV-TIN-0414.tif'); // the film the check above left open
    await page.getByTestId('open-file').filter({ hasText: 'CV-TIN-0414.tif' }).waitFor();
    const png = await download('export-png');
    await page.getByTestId('export-notice').filter({ hasText: /overlay/ }).waitFor();
    const bytes = await readFile(png);
    // The PNG signature (PNG specification, ISO/IEC 15948, section 5.2), then the IHDR chunk first.
    expect([...bytes.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    expect(bytes.readUInt32BE(8)).toBe(13);
    expect(bytes.subarray(12, 16).toString('latin1')).toBe('IHDR');
    const ihdr = { width: bytes.readUInt32BE(16), height: bytes.readUInt32BE(20) };

    // The image's size, read from the TIFF by an independent decoder (Debian's PIL), and as the app shows it.
    const [tifWidth, tifHeight] = execFileSync('/usr/bin/python3', ['-c', 'import sys; from PIL import Image; print(*Image.open(sys.argv[1]).size)', tif], { encoding: 'utf8' }).trim().split(' ').map(Number);
    expect(ihdr).toEqual({ width: tifWidth, height: tifHeight });
    await page.getByTestId('open-file').filter({ hasText: `${tifWidth} × ${tifHeight}` }).waitFor();

    // Decoded by PIL: the spread of the grey levels (the pattern) and the share of coloured pixels (the overlays).
    const stats = JSON.parse(
      execFileSync(
        '/usr/bin/python3',
        [
          '-c',
          [
            'import sys, json',
            'from PIL import Image, ImageStat',
            'im = Image.open(sys.argv[1]); im.load(); rgb = im.convert("RGB")',
            'grey = ImageStat.Stat(rgb.convert("L"))',
            'coloured = sum(1 for r, g, b in rgb.getdata() if max(r, g, b) - min(r, g, b) > 60)',
            'print(json.dumps({"width": im.width, "height": im.height, "sd": grey.stddev[0], "levels": len(rgb.convert("L").getcolors(256) or []), "coloured": coloured}))',
          ].join('\n'),
          png,
        ],
        { encoding: 'utf8' },
      ),
    ) as { width: number; height: number; sd: number; levels: number; coloured: number };
    console.log(`PNG export: ${stats.width} x ${stats.height} (TIFF ${tifWidth} x ${tifHeight}), grey s.d. ${stats.sd.toFixed(1)}, ${stats.levels} grey levels, ${stats.coloured} coloured overlay pixels`);
    expect({ width: stats.width, height: stats.height }).toEqual(ihdr);
    expect(stats.sd).toBeGreaterThan(10); // not one flat colour
    expect(stats.levels).toBeGreaterThan(64); // a grey-scale pattern, not a few flat fills
    // The fitted rings are drawn in colour: each of the five rings is over a thousand pixels round.
    const rings = await page.getByTestId('ring-row').count();
    expect(rings).toBeGreaterThanOrEqual(5);
    expect(stats.coloured).toBeGreaterThan(rings * 1000);
    expect(stats.coloured).toBeLessThan(0.5 * stats.width * stats.height); // the overlays do not cover the pattern
  }, TIMEOUT);
});
