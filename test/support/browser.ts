/**
 * Browser tests drive Debian's Chromium (never a downloaded browser) through playwright-core.
 *
 * `launchChromium()` starts it headless with the project's standard flags. Playwright's `launch()`
 * gives every browser a fresh temporary profile (user-data-dir) and deletes it on close, so no
 * state leaks between runs; each `withPage()` also opens a new context (own cookies and storage).
 *
 * `withPage()` watches the page while the test body runs and fails the test when anything went
 * wrong that the user would not see: a console error, an uncaught exception, a Content-Security-
 * Policy violation, a request to a host other than the app's, or a failed request. Expected
 * failures (a 401 for a wrong password) are declared with `allowFailedResponse()`.
 */
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';

export const chromiumPath = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';

/** The flags every headless Chromium of the project runs with (rules of the project). */
export const chromiumFlags = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
  '--disable-quic',
];

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
export const screenshotDir = path.join(root, 'test-output/screenshots');

export async function launchChromium(): Promise<Browser> {
  return chromium.launch({ executablePath: chromiumPath, headless: true, args: chromiumFlags });
}

export interface PageOptions {
  /** The app's origin, e.g. http://127.0.0.1:54321 (the only host the page may talk to). */
  baseURL: string;
  viewport?: { width: number; height: number };
  colorScheme?: 'light' | 'dark';
}

export interface WatchedPage {
  readonly page: Page;
  readonly context: BrowserContext;
  /** Declares a response the test provokes on purpose (Chromium logs it as a console error). */
  allowFailedResponse(pathPattern: string | RegExp, status: number): void;
  /** Everything that went wrong so far. */
  problems(): readonly string[];
  /** Saves a full-page PNG as test-output/screenshots/<name>.png and returns its path. */
  screenshot(name: string): Promise<string>;
}

export const desktop = { width: 1280, height: 800 };
export const phone = { width: 360, height: 740 };

/**
 * Opens a page in a fresh context, runs `body`, then fails if the page reported any problem.
 * The context is closed in every case.
 */
export async function withPage<T>(browser: Browser, options: PageOptions, body: (watched: WatchedPage) => Promise<T>): Promise<T> {
  const origin = new URL(options.baseURL).origin;
  const context = await browser.newContext({
    baseURL: options.baseURL,
    viewport: options.viewport ?? desktop,
    colorScheme: options.colorScheme ?? 'light',
    reducedMotion: 'reduce',
    serviceWorkers: 'block',
  });
  const problems: string[] = [];
  const allowed: { pattern: string | RegExp; status: number; used: boolean }[] = [];
  const isAllowed = (url: string, status: number) => {
    const { pathname } = new URL(url, origin);
    const hit = allowed.find(
      (a) => a.status === status && (typeof a.pattern === 'string' ? pathname === a.pattern : a.pattern.test(pathname)),
    );
    if (hit) hit.used = true;
    return hit !== undefined;
  };

  // Nothing may leave the app's own origin (fonts, icons, scripts are all self-hosted).
  await context.route(
    (url) => url.origin !== origin && url.protocol !== 'data:' && url.protocol !== 'blob:',
    async (route) => {
      problems.push(`request to an outside host: ${route.request().url()}`);
      await route.abort('blockedbyclient');
    },
  );

  // CSP violations are events in the page; report them to the test through a binding.
  await context.exposeBinding('__spreadproofCspViolation', (_source, text: string) => {
    problems.push(`CSP violation: ${text}`);
  });
  // (A string, not a function: the test code is type-checked without the DOM library.)
  await context.addInitScript({
    content: `document.addEventListener('securitypolicyviolation', (event) => {
      window.__spreadproofCspViolation?.(
        event.effectiveDirective + ' blocked ' + (event.blockedURI || '(inline)') + ' at ' + event.sourceFile + ':' + event.lineNumber,
      );
    });`,
  });

  const page = await context.newPage();
  page.on('console', (message) => {
    if (message.type() !== 'error') return;
    const text = message.text();
    const failed = /^Failed to load resource: the server responded with a status of (\d{3})/.exec(text);
    if (failed && isAllowed(message.location().url, Number(failed[1]))) return;
    problems.push(`console error: ${text} (${message.location().url})`);
  });
  page.on('pageerror', (error) => problems.push(`uncaught exception: ${error.message}`));
  page.on('requestfailed', (request) => {
    const reason = request.failure()?.errorText ?? 'failed';
    // Aborted outside requests are already reported; navigations away abort pending fetches.
    if (reason.includes('ERR_BLOCKED_BY_CLIENT') || reason.includes('ERR_ABORTED')) return;
    problems.push(`request failed: ${request.method()} ${request.url()} (${reason})`);
  });

  const watched: WatchedPage = {
    page,
    context,
    allowFailedResponse(pattern, status) {
      allowed.push({ pattern, status, used: false });
    },
    problems: () => [...problems],
    async screenshot(name) {
      mkdirSync(screenshotDir, { recursive: true });
      const file = path.join(screenshotDir, `${name}.png`);
      await page.screenshot({ path: file, fullPage: true, animations: 'disabled' });
      return file;
    },
  };

  try {
    let result: T;
    try {
      result = await body(watched);
    } catch (error) {
      // Keep a picture of the moment it went wrong, and say where it is.
      const shot = await watched.screenshot(`failed-${new Date().toISOString().replace(/[:.]/g, '-')}`).catch(() => null);
      if (shot && error instanceof Error) error.message += `\n(screenshot: ${shot})`;
      if (problems.length > 0 && error instanceof Error) error.message += `\nThe page also reported:\n  ${problems.join('\n  ')}`;
      throw error;
    }
    // Let late console messages (after the last action) arrive before judging.
    await page.waitForTimeout(100);
    if (problems.length > 0) {
      throw new Error(`The page reported ${problems.length} problem(s):\n  ${problems.join('\n  ')}`);
    }
    return result;
  } finally {
    await context.close();
  }
}
