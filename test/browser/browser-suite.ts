/**
 * The set-up every browser suite shares: a real test server (test/support/server.ts) and one
 * headless Chromium (test/support/browser.ts) for the whole `describe`, both stopped afterwards.
 *
 *     describe('...', function () {
 *       const suite = browserSuite({ server: { seed: true }, startTimeout: 180_000 });
 *       it('...', async () => {
 *         await withPage(suite.browser, { baseURL: suite.server.url }, async ({ page }) => { ... });
 *       });
 *     });
 *
 * Call it inside `describe`: it registers the suite's `before` and `after` hooks.
 */
import type { Browser } from 'playwright-core';
import { launchChromium } from '../support/browser';
import { startTestServer, type TestServer, type TestServerOptions } from '../support/server';

export interface BrowserSuite {
  /** The running server (throws when read before the `before` hook has started it). */
  readonly server: TestServer;
  /** The running Chromium (throws when read before the `before` hook has launched it). */
  readonly browser: Browser;
}

export interface BrowserSuiteOptions {
  /** Options of the test server (default: a fresh seeded database). */
  server?: TestServerOptions;
  /** Time allowed for the `before` hook, when it needs more than the suite's own timeout. */
  startTimeout?: number;
  /** Returns why the suite cannot run on this machine (it is then skipped and says so), or nothing. */
  skipReason?: () => string | undefined;
  /** Runs once the server is up and before Chromium is launched (data the suite starts from). */
  prepare?: (server: TestServer) => Promise<void>;
}

export function browserSuite(options: BrowserSuiteOptions = {}): BrowserSuite {
  let server: TestServer | undefined;
  let browser: Browser | undefined;

  before(async function () {
    if (options.startTimeout !== undefined) this.timeout(options.startTimeout);
    const reason = options.skipReason?.();
    if (reason !== undefined) {
      console.log(`      skipped: ${reason}`);
      this.skip();
    }
    server = await startTestServer(options.server);
    await options.prepare?.(server);
    browser = await launchChromium();
  });

  after(async () => {
    await browser?.close();
    await server?.stop();
  });

  return {
    get server() {
      if (!server) throw new Error('The test server has not been started (browserSuite before hook).');
      return server;
    },
    get browser() {
      if (!browser) throw new Error('Chromium has not been launched (browserSuite before hook).');
      return browser;
    },
  };
}
