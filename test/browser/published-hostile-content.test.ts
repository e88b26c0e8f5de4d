/**
 * The published page in Chromium with hostile content: a worksheet whose title, step titles,
 * column name, unit and description are script in disguise, and whose notes carry script tags,
 * event handlers, javascript: links and KaTeX commands that need trust. After the anonymous page
 * has rendered everything, nothing ran (no dialog, the marker the payloads would set is unset),
 * no element carries an event handler or a javascript: URL, the only scripts are the app's own
 * bundles, and the page reported no CSP violation — the payloads were not even attempted.
 * (The stored HTML itself is checked for many random notes by test/fuzz/hostile-content.test.ts.)
 * Notes that are merely wide (a 400-character word, a 300-character URL, a long display formula,
 * a table of many columns) stay inside their step card on a 360 px phone and on the desktop: long
 * words wrap, formulas and tables scroll inside the note, and the page never scrolls sideways.
 */
import path from 'node:path';
import { expect } from 'chai';
import { demoOwner, SessionClient } from '../../bench/support/session-client';
import { hostileDocument, markdownFragments } from '../fuzz/generators';
import { desktop, phone, screenshotDir, withPage } from '../support/browser';
import { browserSuite } from './browser-suite';

// Wide but harmless notes (invented content; the widths are what matters).
const longWord = '#'.repeat(400);
const longUrl = `https://harrowvale.test/gauges/${'bore-gauge-7-calibration-'.repeat(12)}`.slice(0, 300);
const wideNotes = [
  `Tag of the batch: ${longWord} (end of tag).`,
  `Certificate of the bore gauge: ${longUrl}\n\nThe same as a link: [certificate](${longUrl}).`,
  `Pooled spread of the lots:\n\n$$${Array.from({ length: 14 }, (_, i) => `(x_{${i + 1}} - \\bar{x})^2`).join(' + ')} = s_p^2 (n - k)$$`,
  `Lots of the week:\n\n| ${Array.from({ length: 14 }, (_, i) => `Lot HV-${2400 + i}`).join(' | ')} |\n|${' --- |'.repeat(14)}\n| ${Array.from({ length: 14 }, (_, i) => (12.001 + i / 1000).toFixed(4)).join(' | ')} |`,
];

const title = '<img src=x onerror="window.__spreadproofPwned=1">{{constructor.constructor("window.__spreadproofPwned=1")()}}';

describe('Published page: hostile titles and notes run nothing', function () {
  this.timeout(240_000);
  let token: string;
  const suite = browserSuite({
    prepare: async (server) => {
      const owner = new SessionClient(server.url);
      await owner.signIn(demoOwner.email, demoOwner.password);
      const teamId = (await owner.get('/api/teams')).body.teams[0].id;
      const created = SessionClient.expect(await owner.post(`/api/teams/${teamId}/worksheets`, { source: 'blank', title: 'Hostile' }), 201, 'create');
      // Every fragment once, a few per note.
      const notes: string[] = [];
      for (let i = 0; i < markdownFragments.length; i += 4) notes.push(markdownFragments.slice(i, i + 4).join('\n\n'));
      notes.push(...wideNotes);
      const saved = SessionClient.expect(
        await owner.post(`/api/worksheets/${created.body.worksheet.id}/revisions`, { baseRevisionId: created.body.head.id, document: hostileDocument(title, notes) }),
        201,
        'save',
      );
      token = SessionClient.expect(await owner.post(`/api/revisions/${saved.body.revision.id}/links`, {}), 201, 'publish').body.token;
    },
  });

  it('shows the title as text and runs none of the payloads', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: desktop }, async ({ page, screenshot }) => {
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
      const origin = new URL(suite.server.url).origin;
      for (const src of report.scripts) expect(src.startsWith(`${origin}/`), `script ${src}`).to.equal(true);
    });
  });
  for (const [name, viewport] of [['phone', phone], ['desktop', desktop]] as const) {
    it(`keeps long words, wide formulas and tables inside their card (${name}, ${viewport.width} px)`, async () => {
      await withPage(suite.browser, { baseURL: suite.server.url, viewport }, async ({ page, screenshot }) => {
        await page.goto(`/p/${token}`);
        await page.getByTestId('published-title').waitFor();
        await page.getByTestId('note-html').first().waitFor();
        await page.waitForTimeout(500);

        const report = (await page.evaluate(`(() => {
          const notes = [...document.querySelectorAll('[data-testid="note-html"]')];
          return {
            viewport: document.documentElement.clientWidth,
            documentWidth: Math.max(document.documentElement.scrollWidth, document.body.scrollWidth),
            wide: notes.filter((n) => n.textContent.includes('${longWord}')).length,
            urls: notes.filter((n) => n.textContent.includes('${longUrl}')).length,
            displays: notes.filter((n) => n.querySelector('.katex-display')).length,
            tables: notes.filter((n) => n.querySelector('table')).length,
            notes: notes.map((n, i) => {
              const card = n.closest('article');
              const host = card.parentElement;
              const box = card.getBoundingClientRect();
              return {
                i,
                noteScroll: n.scrollWidth,
                noteWidth: n.clientWidth,
                cardWidth: card.clientWidth,
                cardScroll: card.scrollWidth,
                cardOuter: card.offsetWidth,
                hostWidth: host.clientWidth,
                cardRight: Math.round(box.right),
              };
            }),
          };
        })()`)) as {
          viewport: number;
          documentWidth: number;
          wide: number;
          urls: number;
          displays: number;
          tables: number;
          notes: { i: number; noteScroll: number; noteWidth: number; cardWidth: number; cardScroll: number; cardOuter: number; hostWidth: number; cardRight: number }[];
        };

        // The wide notes are on the page (else the checks below would prove nothing).
        expect(report.wide, 'notes with the 400-character word').to.equal(1);
        expect(report.urls, 'notes with the 300-character URL').to.equal(1);
        expect(report.displays, 'notes with a display formula').to.be.greaterThan(0);
        expect(report.tables, 'notes with a table').to.be.greaterThan(0);
        expect(report.viewport).to.equal(viewport.width);
        for (const n of report.notes) {
          const where = `note ${n.i}: ${JSON.stringify(n)}`;
          expect(n.noteScroll, `${where}: the note is no wider than its card`).to.be.at.most(n.cardWidth);
          expect(n.noteScroll, `${where}: nothing sticks out of the note`).to.be.at.most(n.noteWidth);
          expect(n.cardScroll, `${where}: the card does not scroll`).to.be.at.most(n.cardWidth);
          expect(n.cardOuter, `${where}: the card fits its column`).to.be.at.most(n.hostWidth);
          expect(n.cardRight, `${where}: the card ends inside the viewport`).to.be.at.most(viewport.width);
        }
        expect(report.documentWidth, 'the page does not scroll sideways').to.be.at.most(report.viewport);

        // The formula and the table scroll inside their note instead.
        const scrollers = (await page.evaluate(`(() => [...document.querySelectorAll('[data-testid="note-html"] .katex-display, [data-testid="note-html"] table')]
          .map((el) => {
            return { tag: el.tagName, overflowX: getComputedStyle(el).overflowX, scroll: el.scrollWidth, width: el.clientWidth };
          }))()`)) as { tag: string; overflowX: string; scroll: number; width: number }[];
        for (const s of scrollers) {
          if (s.scroll > s.width) expect(s.overflowX, `${s.tag} wider than its note scrolls: ${JSON.stringify(s)}`).to.equal('auto');
        }
        if (name === 'phone') {
          expect(scrollers.some((s) => s.scroll > s.width), 'at 360 px the display formula or the table is wider than the note').to.equal(true);
        }

        await screenshot(`published-wide-notes-${name}`);
        for (const [label, needle] of [['word', 'Tag of the batch'], ['url', 'Certificate of the bore gauge'], ['formula', 'Pooled spread'], ['table', 'Lots of the week']]) {
          await page
            .locator('li[data-step-id]', { has: page.getByTestId('note-html').filter({ hasText: needle }) })
            .screenshot({ path: path.join(screenshotDir, `published-wide-note-${label}-${name}.png`), animations: 'disabled' });
        }
      });
    });
  }
});
