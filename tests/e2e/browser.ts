import { existsSync, mkdirSync } from 'node:fs';
import path from 'node:path';
import { chromium, type Browser, type Locator, type Page } from 'playwright-core';

export const CHROMIUM_PATH = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
/** Screenshots land here (git-ignored) so a person can look at them. */
export const SCREENSHOT_DIR = path.resolve(import.meta.dirname, '..', '..', 'test-results', 'screenshots');

export const viewports = {
  phone: { width: 390, height: 844 },
  tablet: { width: 1024, height: 768 },
  desktop: { width: 1280, height: 800 },
  display: { width: 1920, height: 1080 },
} as const;

export interface LaunchedBrowser {
  browser: Browser;
  close(): Promise<void>;
}

/**
 * Launches Debian's Chromium with the flags this closed network needs. Playwright gives every
 * launch a fresh temporary profile (it refuses a --user-data-dir argument).
 */
export async function launchBrowser(): Promise<LaunchedBrowser> {
  if (!existsSync(CHROMIUM_PATH)) {
    throw new Error(`Chromium is not installed at ${CHROMIUM_PATH}. Install Debian's package: apt-get install -y chromium`);
  }
  const browser = await chromium.launch({
    executablePath: CHROMIUM_PATH,
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
  return {
    browser,
    async close() {
      await browser.close();
    },
  };
}

/** Saves a full-page screenshot under test-results/screenshots. */
export async function screenshot(page: Page, name: string): Promise<string> {
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  const file = path.join(SCREENSHOT_DIR, `${name}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}

/** Opens `url`, which redirects to the sign-in page, and signs in through the real form. */
export async function signInThroughForm(page: Page, url: string, email: string, password: string): Promise<void> {
  await page.goto(url);
  await page.waitForURL(/\/sign-in/);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

/** Presses and holds a control until `done` resolves, then lets go: the gesture that releases, resumes, ends and starts shifts and ticks make-safe items. */
export async function pressAndHold(page: Page, control: Locator, done: () => Promise<unknown>): Promise<void> {
  await control.scrollIntoViewIfNeeded();
  await control.hover();
  await page.mouse.down();
  try {
    await done();
  } finally {
    await page.mouse.up();
  }
}
