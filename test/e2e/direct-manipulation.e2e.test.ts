/// <reference lib="dom" />
/**
 * Direct manipulation in a real browser: drag the centre of a simulated 2048 x 2048 gold
 * pattern (the coarse-profile rate is measured and printed, never asserted), outline and
 * erase a region to exclude, drop a ring and fit it again where clicked in the profile,
 * change the camera, and undo and redo each step. Screenshots of the new states go to
 * test/e2e/artifacts/ at both sizes and both themes.
 */
import { spawnSync } from 'node:child_process';
import { mkdir, mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromiumAvailable, launchChromium } from './support/chromium';
import { assertRendererBuilt } from './support/renderer-build';
import { startServe, type ServeProcess } from './support/serve-process';
import { ARTIFACTS_DIR, pressShortcut as pressShortcutOn, shootStates, SIZES } from './support/screenshots';

const root = resolve(import.meta.dirname, '..', '..');
const artifacts = ARTIFACTS_DIR;
const ANALYSIS_TIMEOUT_MS = 120_000;
const run = chromiumAvailable();

describe.runIf(run)('direct manipulation in Chromium against annula serve', () => {
  let serve: ServeProcess;
  let browser: Browser;
  let page: Page;
  let tmp: string;
  const pageErrors: string[] = [];
  const cspViolations: string[] = [];

  const attr = async (testId: string, name: string): Promise<string> => (await page.getByTestId(testId).first().getAttribute(name)) ?? '';
  const ringCount = async (): Promise<number> => Number(await page.getByTestId('ring-count').textContent());
  const profilePath = (): Promise<string> => attr('profile-data', 'd');
  const maskedFraction = async (): Promise<number> => Number(await attr('masked-fraction', 'data-fraction'));

  async function settle(): Promise<void> {
    await page.getByTestId('progress').waitFor({ state: 'detached', timeout: ANALYSIS_TIMEOUT_MS });
  }

  async function canvasBox(): Promise<{ x: number; y: number; width: number; height: number }> {
    const box = await page.getByTestId('pattern-canvas').boundingBox();
    if (!box) throw new Error('the pattern canvas is not on screen');
    return box;
  }

  async function centreOnPage(): Promise<{ x: number; y: number }> {
    const [x, y] = (await attr('pattern-canvas', 'data-centre-screen')).split(',').map(Number);
    const box = await canvasBox();
    return { x: box.x + x!, y: box.y + y! };
  }

  const shoot = (state: string): Promise<void> => shootStates(page, state);
  const pressShortcut = (key: string): Promise<void> => pressShortcutOn(page, key);

  async function setCamera(testId: string, text: string): Promise<void> {
    const field = page.getByTestId(testId);
    await field.fill(text);
    await field.press('Tab');
  }

  beforeAll(async () => {
    assertRendererBuilt();
    await mkdir(artifacts, { recursive: true });
    tmp = await mkdtemp(join(tmpdir(), 'annula-dm-'));
    const sim = spawnSync(process.execPath, [join(root, 'app/cli/bin/annula.js'), 'simulate', '--phase', 'Au', '--voltage', '200kV', '--camera-length', '1m', '--pixel-size', '14um', '--size', '2048', '--out', join(tmp, 'au-2048.tif')], { cwd: root, encoding: 'utf8' });
    if (sim.status !== 0) throw new Error(`annula simulate failed: ${sim.stderr}`);
    serve = await startServe();
    browser = await launchChromium();
    const context = await browser.newContext({ viewport: SIZES[0]! });
    page = await context.newPage();
    page.on('console', (m) => {
      if (/Content Security Policy/i.test(m.text())) cspViolations.push(m.text());
    });
    page.on('pageerror', (e) => pageErrors.push(e.message));
    await page.goto(serve.url);
    await page.getByTestId('best-candidate').filter({ hasText: /Au/ }).waitFor({ timeout: ANALYSIS_TIMEOUT_MS });
    await settle();
    // The simulated camera, then the 2048 x 2048 image through the file input.
    await setCamera('camera-length', '1 m');
    await settle();
    await setCamera('pixel-size', '14 µm');
    await settle();
    await page.getByTestId('image-input').setInputFiles(join(tmp, 'au-2048.tif'));
    await page.getByTestId('open-file').filter({ hasText: /2048 × 2048/ }).waitFor({ timeout: ANALYSIS_TIMEOUT_MS });
    await page.getByTestId('best-candidate').filter({ hasText: /Au/ }).waitFor({ timeout: ANALYSIS_TIMEOUT_MS });
    await settle();
    await page.getByTestId('profile-residual').waitFor({ timeout: ANALYSIS_TIMEOUT_MS });
  }, ANALYSIS_TIMEOUT_MS * 3);

  afterAll(async () => {
    await browser?.close();
    await serve?.stop();
    if (tmp) await rm(tmp, { recursive: true, force: true });
  });

  it('moves the centre: the profile follows the pointer and is measured again on release; undo and redo restore it', async () => {
    expect(await attr('profile-residual', 'd')).toMatch(/^M/);
    const before = await profilePath();
    const centreBefore = await attr('pattern-canvas', 'data-centre-image');
    const updatesBefore = Number(await attr('profile-plot', 'data-updates'));
    const start = await centreOnPage();
    // First a drag as fast as the browser takes pointer moves (what the worker can keep up with), released, then undone.
    await page.mouse.move(start.x, start.y);
    await page.mouse.down();
    const fastSteps = 120;
    const f0 = Date.now();
    for (let k = 1; k <= fastSteps; k++) await page.mouse.move(start.x + 0.25 * k, start.y + 0.15 * k);
    await page.waitForFunction(() => document.querySelector('[data-testid="profile-plot"]')?.getAttribute('data-drag-updates') !== '0');
    const fastS = (Date.now() - f0) / 1000;
    const fastUpdates = Number(await attr('profile-plot', 'data-drag-updates'));
    const fastWorkerMs = Number(await attr('profile-plot', 'data-drag-worker-ms'));
    await page.mouse.up();
    console.log(`centre drag on 2048 x 2048, pointer as fast as it goes: ${fastUpdates} profile refreshes for ${fastSteps} pointer moves in ${fastS.toFixed(2)} s = ${(fastUpdates / fastS).toFixed(1)} frames/s (pointer ${(fastSteps / fastS).toFixed(0)} moves/s, ratio ${(fastUpdates / fastSteps).toFixed(2)}); coarse profile ${(fastWorkerMs / fastUpdates).toFixed(1)} ms each in the worker`);
    await settle();
    await pressShortcut('Control+z');
    await settle();
    await expect.poll(() => attr('pattern-canvas', 'data-centre-image')).toBe(centreBefore);

    await page.mouse.move(start.x, start.y);
    await page.mouse.down();
    // Then 90 pointer moves of 0.5 screen px with a 16 ms pause after each.
    const steps = 90;
    const t0 = Date.now();
    for (let k = 1; k <= steps; k++) {
      await page.mouse.move(start.x + 0.5 * k, start.y + 0.3 * k);
      await page.waitForTimeout(16);
    }
    const elapsedS = (Date.now() - t0) / 1000;
    // While dragging the plot shows the coarse profile.
    expect(await attr('profile-plot', 'data-preview')).toBe('coarse');
    const during = await profilePath();
    await page.screenshot({ path: resolve(artifacts, 'centre-drag-1280x800-dark.png') });
    const updates = Number(await attr('profile-plot', 'data-drag-updates'));
    const moves = Number(await attr('profile-plot', 'data-drag-moves'));
    await page.mouse.up();
    console.log(`centre drag on 2048 x 2048, paced pointer: ${updates} profile refreshes for ${moves} pointer moves in ${elapsedS.toFixed(2)} s = ${(updates / elapsedS).toFixed(1)} frames/s, pointer ${(moves / elapsedS).toFixed(1)} moves/s, ratio ${(updates / moves).toFixed(2)}`);
    expect(updates).toBeGreaterThan(0);
    expect(moves).toBe(steps);
    expect(during).not.toBe(before);
    await settle();
    await page.waitForFunction(() => document.querySelector('[data-testid="profile-plot"]')?.getAttribute('data-preview') === 'exact');
    const after = await profilePath();
    const centreAfter = await attr('pattern-canvas', 'data-centre-image');
    expect(after).not.toBe(before);
    expect(centreAfter).not.toBe(centreBefore);
    expect(Number(await attr('profile-plot', 'data-updates'))).toBeGreaterThan(updatesBefore);
    await shoot('centre-moved');

    await pressShortcut('Control+z');
    await settle();
    await expect.poll(() => attr('pattern-canvas', 'data-centre-image')).toBe(centreBefore);
    expect(await profilePath()).toBe(before);
    await page.getByTestId('redo').click();
    await settle();
    await expect.poll(() => attr('pattern-canvas', 'data-centre-image')).toBe(centreAfter);
    expect(await profilePath()).toBe(after);
    await page.getByTestId('undo').click();
    await settle();
    await expect.poll(() => attr('pattern-canvas', 'data-centre-image')).toBe(centreBefore);
  }, ANALYSIS_TIMEOUT_MS * 2);

  it('outlines a region to exclude: the masked fraction rises, erase and undo take it back', async () => {
    const fraction0 = await maskedFraction();
    const rings0 = await ringCount();
    await page.getByTestId('tool-exclude').click();
    await page.getByTestId('tool-hint').waitFor();
    const c = await centreOnPage();
    // A wedge from near the centre outwards, over the rings.
    const corners: Array<[number, number]> = [[c.x + 20, c.y - 15], [c.x + 230, c.y - 90], [c.x + 230, c.y + 90], [c.x + 20, c.y + 15]];
    for (const [x, y] of corners) await page.mouse.click(x, y);
    await pressShortcut('Enter');
    await settle();
    await expect.poll(maskedFraction, { timeout: ANALYSIS_TIMEOUT_MS }).toBeGreaterThan(fraction0 + 0.005);
    const fraction1 = await maskedFraction();
    console.log(`masked fraction ${(fraction0 * 100).toFixed(2)} % -> ${(fraction1 * 100).toFixed(2)} % with the drawn region; rings ${rings0} -> ${await ringCount()}`);
    await shoot('region-excluded');

    await page.getByTestId('tool-erase').click();
    await page.mouse.click(c.x + 150, c.y);
    await settle();
    await expect.poll(maskedFraction).toBe(fraction0);
    await pressShortcut('Control+z');
    await settle();
    await expect.poll(maskedFraction).toBe(fraction1);
    await pressShortcut('Control+z');
    await settle();
    await expect.poll(maskedFraction).toBe(fraction0);
    await pressShortcut('Control+Shift+z');
    await settle();
    await expect.poll(maskedFraction).toBe(fraction1);
    await pressShortcut('Control+z');
    await settle();
    await expect.poll(maskedFraction).toBe(fraction0);
    await page.getByTestId('tool-move').click();
  }, ANALYSIS_TIMEOUT_MS * 3);

  it('drops a ring and fits it again where clicked in the profile; undo and redo restore each count', async () => {
    const n0 = await ringCount();
    // At L/p = 71 400 px the image holds Au 111, 200, 220 and part of 311.
    expect(n0).toBeGreaterThanOrEqual(3);
    const rowText = async (i: number): Promise<string> => (await page.getByTestId('ring-row').nth(i).textContent()) ?? '';
    const second = await rowText(1);
    const radius = Number(/^\s*×?\s*2\s*([\d.]+)/.exec(second)?.[1]);
    expect(radius).toBeGreaterThan(0);
    const best0 = await page.getByTestId('best-candidate').textContent();
    await page.getByTestId("drop-ring").nth(1).click();
    await settle();
    await expect.poll(ringCount).toBe(n0 - 1);
    expect(await rowText(1)).not.toBe(second);
    await shoot('ring-dropped');

    // Add it back: the add-ring tool, then a click in the profile at its radius.
    await page.getByTestId('tool-add-ring').click();
    const [left, w, x0, x1] = (await attr('profile-plot', 'data-axis')).split(',').map(Number);
    const plotBox = (await page.getByTestId('profile-plot').boundingBox())!;
    await page.mouse.click(plotBox.x + left! + ((radius - x0!) / (x1! - x0!)) * w!, plotBox.y + 40);
    await settle();
    await expect.poll(ringCount).toBe(n0);
    expect(await rowText(1)).toMatch(/^\s*×?\s*2\+/);
    const readded = Number(/^\s*×?\s*2\+?\s*([\d.]+)/.exec(await rowText(1))?.[1]);
    console.log(`ring 2: measured at ${radius} px, fitted again where clicked at ${readded} px`);
    expect(Math.abs(readded - radius)).toBeLessThan(0.2);
    await expect.poll(() => page.getByTestId('best-candidate').textContent()).toMatch(/Au/);
    await shoot('ring-added');

    // A click where there is no peak is refused with a reason, and nothing changes.
    const [l2, w2, a0, a1] = (await attr('profile-plot', 'data-axis')).split(',').map(Number);
    // Halfway between rings 2 and 3.
    const emptyR = (radius + Number(/^\s*×?\s*3\s*([\d.]+)/.exec(await rowText(2))?.[1])) / 2;
    await page.mouse.click(plotBox.x + l2! + ((emptyR - a0!) / (a1! - a0!)) * w2!, plotBox.y + 40);
    await settle();
    await page.getByTestId('error-message').filter({ hasText: /peak|ring/ }).waitFor({ timeout: 30_000 });
    expect(await ringCount()).toBe(n0);

    await page.getByTestId('undo').click();
    await settle();
    await expect.poll(ringCount).toBe(n0 - 1);
    await page.getByTestId('undo').click();
    await settle();
    await expect.poll(ringCount).toBe(n0);
    expect(await rowText(1)).toBe(second);
    expect(await page.getByTestId('best-candidate').textContent()).toBe(best0);
    await page.getByTestId('redo').click();
    await settle();
    await expect.poll(ringCount).toBe(n0 - 1);
    await page.getByTestId('undo').click();
    await settle();
    await expect.poll(ringCount).toBe(n0);
    await pressShortcut('v');
  }, ANALYSIS_TIMEOUT_MS * 3);

  it('undoes and redoes a camera change', async () => {
    const best0 = (await page.getByTestId('best-candidate').textContent()) ?? '';
    const a0 = Number(/a = ([\d.]+)/.exec(best0)?.[1]);
    await setCamera('camera-length', '1.02 m');
    await settle();
    await expect.poll(async () => Number(/a = ([\d.]+)/.exec((await page.getByTestId('best-candidate').textContent()) ?? '')?.[1])).not.toBe(a0);
    const a1 = Number(/a = ([\d.]+)/.exec((await page.getByTestId('best-candidate').textContent()) ?? '')?.[1]);
    // a scales with the camera length (small-angle: d ~ lambda L / R).
    expect(a1 / a0).toBeGreaterThan(1.015);
    await pressShortcut('Control+z');
    await settle();
    await expect.poll(() => page.getByTestId('camera-length').inputValue()).toBe('1 m');
    await expect.poll(() => page.getByTestId('best-candidate').textContent()).toBe(best0);
    await pressShortcut('Control+Shift+z');
    await settle();
    await expect.poll(() => page.getByTestId('camera-length').inputValue()).toBe('1.02 m');
    await pressShortcut('Control+z');
    await settle();
    await pressShortcut('?');
    await page.getByRole('dialog', { name: 'Keyboard shortcuts' }).waitFor();
    expect(await page.getByRole('dialog').textContent()).toMatch(/Ctrl\+Z.*Undo/);
    await shoot('help-with-edits');
    await page.keyboard.press('Escape');
    expect(cspViolations).toEqual([]);
    expect(pageErrors).toEqual([]);
  }, ANALYSIS_TIMEOUT_MS * 2);
});
