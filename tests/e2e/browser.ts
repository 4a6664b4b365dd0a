import { existsSync, mkdirSync } from 'node:fs';
import path from 'node:path';
import { chromium, type Browser, type BrowserContext, type Locator, type Page } from 'playwright-core';
import { afterEach } from 'vitest';

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
 * Content security policy violations seen by any page of any browser launched here. Every page
 * reports them twice over: the document's `securitypolicyviolation` event (an init script turns it
 * into a console error with a marker) and Chromium's own "Refused to ..." console error, which
 * also covers workers. The `afterEach` below fails the test during which one happened, so every
 * browser test also proves the built client runs under the server's policy.
 */
const cspViolations: string[] = [];
const CSP_MARKER = '[holdline-csp-violation]';
const watchedContexts = new WeakSet<BrowserContext>();

async function watchForCspViolations(context: BrowserContext): Promise<BrowserContext> {
  if (watchedContexts.has(context)) return context;
  watchedContexts.add(context);
  await context.addInitScript((marker: string) => {
    document.addEventListener('securitypolicyviolation', (e) => {
      console.error(`${marker} ${e.violatedDirective} blocked ${e.blockedURI || '(inline)'} at ${e.sourceFile}:${e.lineNumber}`);
    });
  }, CSP_MARKER);
  context.on('console', (message) => {
    const text = message.text();
    if (text.includes(CSP_MARKER) || /Content Security Policy/i.test(text)) cspViolations.push(`${message.page()?.url() ?? '(no page)'}: ${text}`);
  });
  return context;
}

/** Throws (failing the test or hook that calls it) when a page broke the content security policy since the last call. */
export function expectNoCspViolations(): void {
  if (cspViolations.length === 0) return;
  const seen = cspViolations.splice(0);
  throw new Error(`The page broke the content security policy (${seen.length}):\n${seen.join('\n')}`);
}

afterEach(() => {
  expectNoCspViolations();
});

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
  // Every context, made directly or through newPage, is watched for policy violations. The app's
  // service worker is blocked unless a test asks for it (`serviceWorkers: 'allow'`, the offline
  // test): installing it downloads the whole app shell in every context, and the run after it
  // landed took a fifth longer in the files that open many pages, for nothing the offline test
  // does not already check.
  const newContext = browser.newContext.bind(browser);
  browser.newContext = async (options?: Parameters<Browser['newContext']>[0]) => watchForCspViolations(await newContext({ serviceWorkers: 'block', ...options }));
  const newPage = browser.newPage.bind(browser);
  browser.newPage = async (options?: Parameters<Browser['newPage']>[0]) => {
    const page = await newPage({ serviceWorkers: 'block', ...options });
    await watchForCspViolations(page.context());
    return page;
  };
  return {
    browser,
    async close() {
      await browser.close();
      // A violation after the last test (in an afterAll) still fails the file.
      expectNoCspViolations();
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
