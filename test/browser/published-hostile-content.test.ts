/**
 * The published page in Chromium with hostile content: a worksheet whose title, step titles,
 * column name, unit and description are script in disguise, and whose notes carry script tags,
 * event handlers, javascript: links and KaTeX commands that need trust. After the anonymous page
 * has rendered everything, nothing ran (no dialog, the marker the payloads would set is unset),
 * no element carries an event handler or a javascript: URL, the only scripts are the app's own
 * bundles, and the page reported no CSP violation — the payloads were not even attempted.
 * (The stored HTML itself is checked for many random notes by test/fuzz/hostile-content.test.ts.)
 */
import { expect } from 'chai';
import type { Browser } from 'playwright-core';
import { demoOwner, SessionClient } from '../../bench/support/session-client';
import { hostileDocument, markdownFragments } from '../fuzz/generators';
import { desktop, launchChromium, withPage } from '../support/browser';
import { startTestServer, type TestServer } from '../support/server';

const title = '<img src=x onerror="window.__spreadproofPwned=1">{{constructor.constructor("window.__spreadproofPwned=1")()}}';

describe('Published page: hostile titles and notes run nothing', function () {
  this.timeout(240_000);
  let server: TestServer | undefined;
  let browser: Browser | undefined;
  let token: string;

  before(async () => {
    server = await startTestServer();
    const owner = new SessionClient(server.url);
    await owner.signIn(demoOwner.email, demoOwner.password);
    const teamId = (await owner.get('/api/teams')).body.teams[0].id;
    const created = SessionClient.expect(await owner.post(`/api/teams/${teamId}/worksheets`, { source: 'blank', title: 'Hostile' }), 201, 'create');
    // Every fragment once, a few per note.
    const notes: string[] = [];
    for (let i = 0; i < markdownFragments.length; i += 4) notes.push(markdownFragments.slice(i, i + 4).join('\n\n'));
    const saved = SessionClient.expect(
      await owner.post(`/api/worksheets/${created.body.worksheet.id}/revisions`, { baseRevisionId: created.body.head.id, document: hostileDocument(title, notes) }),
      201,
      'save',
    );
    token = SessionClient.expect(await owner.post(`/api/revisions/${saved.body.revision.id}/links`, {}), 201, 'publish').body.token;
    browser = await launchChromium();
  });

  after(async () => {
    await browser?.close();
    await server?.stop();
  });

  it('shows the title as text and runs none of the payloads', async () => {
    await withPage(browser!, { baseURL: server!.url, viewport: desktop }, async ({ page, screenshot }) => {
      const dialogs: string[] = [];
      page.on('dialog', (dialog) => {
        dialogs.push(dialog.message());
        void dialog.dismiss();
      });
      await page.goto(`/p/${token}`);
      await page.getByTestId('published-title').waitFor();
      expect(await page.getByTestId('published-title').textContent()).to.equal(title);
      await page.getByTestId('note-html').first().waitFor();
      expect(await page.getByTestId('note-html').count()).to.be.greaterThan(3);
      // Give handlers (onerror of a broken image, onload, autofocus) the time they would need.
      await page.waitForTimeout(1500);
      await screenshot('published-hostile-content');

      const report = (await page.evaluate(`(() => {
        const all = [...document.querySelectorAll('*')];
        return {
          pwned: window.__spreadproofPwned ?? null,
          handlers: all.flatMap((el) => [...el.attributes].filter((a) => a.name.toLowerCase().startsWith('on')).map((a) => el.tagName + ' ' + a.name)),
          scriptUrls: all.flatMap((el) => [...el.attributes].filter((a) => /^\\s*(javascript|data|vbscript):/i.test(a.value) && /href|src|action/i.test(a.name)).map((a) => el.tagName + ' ' + a.name)),
          scripts: [...document.scripts].map((s) => s.src || '(inline)'),
          frames: document.querySelectorAll('iframe, object, embed, frame').length,
          images: document.querySelectorAll('.note-body img').length,
        };
      })()`)) as { pwned: unknown; handlers: string[]; scriptUrls: string[]; scripts: string[]; frames: number; images: number };

      expect(dialogs).to.deep.equal([]);
      expect(report.pwned).to.equal(null);
      expect(report.handlers).to.deep.equal([]);
      expect(report.scriptUrls).to.deep.equal([]);
      expect(report.frames).to.equal(0);
      expect(report.images).to.equal(0);
      const origin = new URL(server!.url).origin;
      for (const src of report.scripts) expect(src.startsWith(`${origin}/`), `script ${src}`).to.equal(true);
    });
  });
});
