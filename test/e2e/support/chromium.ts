/**
 * Debian's Chromium driven by playwright-core (never `npx playwright install`). Without
 * /usr/bin/chromium the browser tests are skipped with a message, except in CI
 * (ANNULA_REQUIRE_REFERENCE=1), where a missing browser fails them.
 */
import { existsSync } from 'node:fs';
import { chromium, type Browser } from 'playwright-core';

export const CHROMIUM_PATH = '/usr/bin/chromium';
export const CHROMIUM_ARGS = ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'];

export function chromiumAvailable(): boolean {
  if (existsSync(CHROMIUM_PATH)) return true;
  if (process.env.ANNULA_REQUIRE_REFERENCE === '1') throw new Error(`${CHROMIUM_PATH} is missing: apt-get install -y chromium (CI requires the browser tests)`);
  console.warn(`browser tests skipped: ${CHROMIUM_PATH} is missing (apt-get install -y chromium)`);
  return false;
}

export function launchChromium(): Promise<Browser> {
  return chromium.launch({ executablePath: CHROMIUM_PATH, headless: true, args: CHROMIUM_ARGS });
}
