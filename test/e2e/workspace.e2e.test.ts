/// <reference lib="dom" />
/**
 * The workspace in a real browser (Debian's Chromium) against the real `annula serve`
 * and its handlers over loopback. Screenshots of each main state, at 1280 x 800 and
 * 1920 x 1080, dark and light, go to test/e2e/artifacts/ (git-ignored).
 */
import { request } from 'node:http';
import { mkdir, readFile } from 'node:fs/promises';
import { resolve } from 'node:path';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromiumAvailable, launchChromium } from './support/chromium';
import { assertRendererBuilt } from './support/renderer-build';
import { startServe, type ServeProcess } from './support/serve-process';
import { ARTIFACTS_DIR, pressShortcut as pressShortcutOn, shootStates, SIZES } from './support/screenshots';

const root = resolve(import.meta.dirname, '..', '..');
const artifacts = ARTIFACTS_DIR;
const ANALYSIS_TIMEOUT_MS = 90_000;

const run = chromiumAvailable();

/** Raw HTTP (no browser) so the Host header can be set freely. */
function rawGet(port: number, path: string, headers: Record<string, string>): Promise<{ status: number; body: string; headers: Record<string, string | string[] | undefined> }> {
  return new Promise((resolvePromise, reject) => {
    const req = request({ host: '127.0.0.1', port, path, method: 'GET', headers }, (res) => {
      let body = '';
      res.on('data', (c: Buffer) => (body += c.toString()));
      res.on('end', () => resolvePromise({ status: res.statusCode ?? 0, body, headers: res.headers }));
    });
    req.on('error', reject);
    req.end();
  });
}

/** Relativistic electron wavelength, pm, written out here from CODATA 2018 (independent of core/physics). */
function wavelengthPm(voltageV: number): number {
  const h = 6.62607015e-34;
  const m = 9.1093837015e-31;
  const e = 1.602176634e-19;
  const c = 299792458;
  return (h / Math.sqrt(2 * m * e * voltageV * (1 + (e * voltageV) / (2 * m * c * c)))) * 1e12;
}

describe.runIf(run)('the workspace in Chromium against annula serve', () => {
  let serve: ServeProcess;
  let browser: Browser;
  let context: BrowserContext;
  let page: Page;
  const cspViolations: string[] = [];
  const pageErrors: string[] = [];

  async function bestText(): Promise<string> {
    return (await page.getByTestId('best-candidate').textContent()) ?? '';
  }

  async function waitForBest(pattern: RegExp): Promise<string> {
    await page.getByTestId('best-candidate').filter({ hasText: pattern }).waitFor({ timeout: ANALYSIS_TIMEOUT_MS });
    await page.getByTestId('progress').waitFor({ state: 'detached', timeout: ANALYSIS_TIMEOUT_MS });
    return bestText();
  }

  const shoot = (state: string): Promise<void> => shootStates(page, state);
  const pressShortcut = (key: string): Promise<void> => pressShortcutOn(page, key);

  beforeAll(async () => {
    assertRendererBuilt();
    await mkdir(artifacts, { recursive: true });
    serve = await startServe();
    browser = await launchChromium();
    context = await browser.newContext({ viewport: SIZES[0]! });
    page = await context.newPage();
    page.on('console', (m) => {
      if (/Content Security Policy/i.test(m.text())) cspViolations.push(m.text());
    });
    page.on('pageerror', (e) => pageErrors.push(e.message));
  }, 120_000);

  afterAll(async () => {
    await browser?.close();
    await serve?.stop();
  });

  it('opens the demo sample on first launch and shows Au as the best candidate', async () => {
    await page.goto(serve.url);
    // The token moved from the address into a cookie.
    expect(page.url()).not.toContain('token=');
    const text = await waitForBest(/Au/);
    expect(text).toMatch(/Au\s*gold/);
    const a = Number(/a = ([\d.]+)/.exec(text)?.[1]);
    // samples/gold-standard/sample.json: expected a = 4.0786 Å (simulator truth); nominal camera, so 0.05%.
    expect(Math.abs(a / 4.0786 - 1)).toBeLessThan(5e-4);
    expect(await page.getByTestId('ring-row').count()).toBeGreaterThanOrEqual(5);
    await expect.poll(() => page.getByTestId('ring-row').first().textContent()).toMatch(/111/);
    await shoot('demo-analysis');
    expect(cspViolations).toEqual([]);
    expect(pageErrors).toEqual([]);
  }, ANALYSIS_TIMEOUT_MS * 2);

  it('shows the keyboard shortcuts in a help panel', async () => {
    await pressShortcut('?');
    await page.getByRole('dialog', { name: 'Keyboard shortcuts' }).waitFor();
    await shoot('help-panel');
    await page.keyboard.press('Escape');
    await page.getByRole('dialog').waitFor({ state: 'detached' });
  }, 60_000);

  it('opens samples/tin-coating through the file input and finds TiN', async () => {
    await page.getByTestId('image-input').setInputFiles(resolve(root, 'samples/tin-coating/pattern.tif'));
    const text = await waitForBest(/TiN/);
    const a = Number(/a = ([\d.]+)/.exec(text)?.[1]);
    // samples/tin-coating/sample.json: expected a = 4.24679 Å (simulator truth).
    expect(Math.abs(a / 4.24679 - 1)).toBeLessThan(5e-4);
    await shoot('tin-coating');
  }, ANALYSIS_TIMEOUT_MS * 2);

  it('opens samples/tin-coating by drag-and-drop and finds TiN', async () => {
    await pressShortcut('d'); // back to the gold demo first
    await waitForBest(/Au/);
    const bytes = await readFile(resolve(root, 'samples/tin-coating/pattern.tif'));
    await page.evaluate(async (b64) => {
      const bin = Uint8Array.from(atob(b64), (ch) => ch.charCodeAt(0));
      const transfer = new DataTransfer();
      transfer.items.add(new File([bin], 'tin-dropped.tif', { type: 'image/tiff' }));
      const target = document.querySelector('[data-testid="pattern-canvas"]')!;
      target.dispatchEvent(new DragEvent('dragover', { dataTransfer: transfer, bubbles: true, cancelable: true }));
      target.dispatchEvent(new DragEvent('drop', { dataTransfer: transfer, bubbles: true, cancelable: true }));
    }, bytes.toString('base64'));
    await waitForBest(/TiN/);
    await expect.poll(() => page.getByTestId('open-file').textContent()).toContain('tin-dropped.tif');
  }, ANALYSIS_TIMEOUT_MS * 2);

  it('changes the wavelength and the d-spacings when the voltage changes', async () => {
    const before = (await page.getByTestId('wavelength').textContent()) ?? '';
    expect(Number(/([\d.]+) pm/.exec(before)?.[1])).toBeCloseTo(wavelengthPm(200e3), 4);
    const ringBefore = await page.getByTestId('ring-row').first().textContent();
    await page.getByTestId('voltage').fill('300 kV');
    const after = (await page.getByTestId('wavelength').textContent()) ?? '';
    expect(Number(/([\d.]+) pm/.exec(after)?.[1])).toBeCloseTo(wavelengthPm(300e3), 4);
    await page.getByTestId('voltage').press('Enter'); // change event: applied
    await expect.poll(() => page.getByTestId('ring-row').first().textContent(), { timeout: 30_000 }).not.toBe(ringBefore);
    // A bad value says what is wrong and is not applied.
    await page.getByTestId('voltage').fill('300 kg');
    await expect.poll(() => page.getByRole('alert').filter({ hasText: /voltage/ }).count()).toBeGreaterThan(0);
    await page.getByTestId('voltage').fill('200 kV');
    await page.getByTestId('voltage').press('Enter');
    await waitForBest(/TiN/);
  }, 90_000);

  it('shows a clear message for a corrupt file and keeps working', async () => {
    const before = await bestText();
    const garbage = Buffer.concat([Buffer.from([0x49, 0x49, 0x2a, 0x00, 0x08, 0x00, 0x00, 0x00]), Buffer.alloc(64, 0xff)]);
    await page.getByTestId('image-input').setInputFiles({ name: 'broken.tif', mimeType: 'image/tiff', buffer: garbage });
    const message = page.getByTestId('error-message');
    await message.waitFor({ timeout: 30_000 });
    const text = (await message.textContent()) ?? '';
    expect(text).toContain('broken.tif');
    expect(text).toMatch(/;/); // what is wrong; what to do
    expect(await bestText()).toBe(before); // the previous analysis stays
    await shoot('corrupt-file');
    await page.getByTestId('image-input').setInputFiles(resolve(root, 'samples/gold-standard/pattern.tif'));
    await waitForBest(/Au/);
    expect(pageErrors).toEqual([]);
  }, ANALYSIS_TIMEOUT_MS * 2);

  it('refuses requests without the token', async () => {
    const noToken = await rawGet(serve.port, '/', { Host: `127.0.0.1:${serve.port}` });
    expect(noToken.status).toBe(401);
    const wrong = await rawGet(serve.port, '/?token=not-the-token', { Host: `127.0.0.1:${serve.port}` });
    expect(wrong.status).toBe(401);
    const fresh = await browser.newContext();
    const api = await fresh.request.post(`${serve.origin}/api/list-samples`, { data: {} });
    expect(api.status()).toBe(401);
    await fresh.close();
    const withToken = await rawGet(serve.port, `/?token=${serve.token}`, { Host: `127.0.0.1:${serve.port}` });
    expect(withToken.status).toBe(303);
    expect(String(withToken.headers['set-cookie'])).toMatch(/HttpOnly; SameSite=Strict/);
  });

  it('refuses a non-loopback Host header (DNS rebinding)', async () => {
    const rebound = await rawGet(serve.port, `/?token=${serve.token}`, { Host: `attacker.example:${serve.port}` });
    expect(rebound.status).toBe(421);
    const cookie = `annula-token=${serve.token}`;
    const ok = await rawGet(serve.port, '/', { Host: `localhost:${serve.port}`, Cookie: cookie });
    expect(ok.status).toBe(200);
    expect(String(ok.headers['content-security-policy'])).toContain("script-src 'self'");
  });
});
