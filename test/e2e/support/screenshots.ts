/**
 * The workspace's states as screenshots at both sizes and both themes (issue 5: readable at
 * 1280 x 800 and 1920 x 1080, dark and light), into test/e2e/artifacts (git-ignored).
 */
import { resolve } from 'node:path';
import type { Page } from 'playwright-core';

export const ARTIFACTS_DIR = resolve(import.meta.dirname, '..', 'artifacts');

/** The two window sizes every state is looked at; the first is the one tests run at. */
export const SIZES = [
  { width: 1280, height: 800 },
  { width: 1920, height: 1080 },
] as const;

/** Presses a keyboard shortcut; shortcuts act only when no text field has the focus. */
export async function pressShortcut(page: Page, key: string): Promise<void> {
  await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
  await page.keyboard.press(key);
}

/**
 * Writes `<state>-<width>x<height>-<theme>.png` for both themes and sizes (the theme is
 * switched with its shortcut, t), then returns to the first size and the dark theme.
 */
export async function shootStates(page: Page, state: string): Promise<void> {
  for (const theme of ['dark', 'light'] as const) {
    if ((await page.evaluate(() => document.documentElement.dataset.theme)) !== theme) {
      await pressShortcut(page, 't');
      await page.waitForFunction((t) => document.documentElement.dataset.theme === t, theme);
    }
    for (const size of SIZES) {
      await page.setViewportSize(size);
      await page.waitForTimeout(250);
      await page.screenshot({ path: resolve(ARTIFACTS_DIR, `${state}-${size.width}x${size.height}-${theme}.png`) });
    }
  }
  await page.setViewportSize(SIZES[0]);
  if ((await page.evaluate(() => document.documentElement.dataset.theme)) !== 'dark') await pressShortcut(page, 't');
  await page.waitForTimeout(250);
}
