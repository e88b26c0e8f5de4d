/**
 * Way of use 3 — the reviewer: compares the analyst's revision (95 %) with the colleague's fork
 * (99 %), sees the changed interval highlighted, and approves the fork's revision. Bad inputs on
 * the way: comparing a revision with itself, and asking for changes without saying which.
 *
 * The before → after values are checked against the NIST/SEMATECH e-Handbook limits for sigma of
 * GEAR.DAT: 95 %: 0.00551 – 0.00729, 99 %: 0.00530 – 0.00766.
 */
import { expect } from 'chai';
import type { Page } from 'playwright-core';
import { desktop, phone, withPage } from '../support/browser';
import {
  ApiSession,
  gearBrowserSuite,
  gearWorksheet,
  handbookSigmaLimits,
  matchesPrinted,
  people,
  shownNumber,
  signInThroughPage,
} from './collaboration-setup';

describe('Reviewer: compares two revisions and approves one', function () {
  this.timeout(240_000);
  let fork: { worksheetId: string; revisionId: string; contentHash: string };
  const suite = gearBrowserSuite(async (server, sheet, data) => {
    // The colleague's fork at 99 % (what colleague.test.ts does through the page).
    const tomas = new ApiSession(server.url);
    await tomas.signIn(people.colleague);
    const title = 'Gear diameter spread at 99 %';
    const forked = await tomas.post<any>(`/api/revisions/${sheet.revisionId}/fork`, {
      teamId: sheet.teamId,
      title,
      message: 'Read at 99 % confidence',
      document: gearWorksheet(data, 0.99, title),
    });
    fork = { worksheetId: forked.worksheet.id, revisionId: forked.head.id, contentHash: forked.head.contentHash };
    const team = await tomas.get<any>(`/api/teams/${sheet.teamId}`);
    const priyaId = team.members.find((m: { email: string }) => m.email === people.reviewer).userId;
    await tomas.post(`/api/revisions/${fork.revisionId}/review-requests`, { reviewerId: priyaId, message: 'Same data, read at 99 %.' });
  });

  it('sees the changed interval highlighted, is stopped on bad input, and approves the fork', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: desktop }, async ({ page, screenshot }) => {
      await signInThroughPage(page, people.reviewer);

      // The request waits in the reviewer's list, reached from the account menu.
      await page.getByTestId('user-menu').click();
      await page.getByTestId('reviews-link').click();
      const request = page.getByRole('link', { name: 'Gear diameter spread at 99 %, revision 1' });
      await request.waitFor();
      await screenshot('reviewer-0-requests');
      await request.click();
      await page.waitForURL(`**/revisions/${fork.revisionId}#review`);
      await page.getByTestId('fork-origin').waitFor();

      // From the fork's revision to the comparison with its origin.
      await page.getByRole('link', { name: 'Compare with origin' }).click();
      await page.waitForURL(/\/compare\?/);
      const changes = page.getByTestId('result-changes');
      await changes.waitFor();

      const interval = changes.locator('[data-step-kind="sigma-interval"]');
      const lower = interval.locator('[data-testid="result-change"][data-path="values.chisq.sdLower"]');
      const upper = interval.locator('[data-testid="result-change"][data-path="values.chisq.sdUpper"]');
      for (const [row, side] of [[lower, 'lower'], [upper, 'upper']] as const) {
        await row.waitFor();
        expect(await row.getAttribute('class'), `${side} bound row is marked notable`).to.contain('notable');
        const before = shownNumber(await row.locator('td.old').textContent());
        const after = shownNumber(await row.locator('td.new').textContent());
        expect(matchesPrinted(before, handbookSigmaLimits[0.95][side]), `before ${side} ${before}`).to.equal(true);
        expect(matchesPrinted(after, handbookSigmaLimits[0.99][side]), `after ${side} ${after}`).to.equal(true);
        await expectHighlighted(page, row.locator('td.new mark'));
      }
      // The parameter that changed is listed with its old and new value.
      const params = page.getByTestId('step-changes');
      expect(await params.innerText()).to.contain('levels');
      const summary = await page.getByTestId('compare-summary').innerText();
      expect(summary).to.match(/\b0\s+conclusions flipped/);
      await screenshot('reviewer-1-compare');

      // Comparing a revision with itself: the page says so and asks the server nothing.
      let compareCalls = 0;
      page.on('request', (request) => {
        if (request.url().includes('/api/compare')) compareCalls += 1;
      });
      await page.goto(`/compare?from=${fork.revisionId}&to=${fork.revisionId}`);
      await page.getByTestId('same-revision').waitFor();
      await page.getByRole('link', { name: /History of/ }).waitFor();
      await page.getByTestId('pick-to').getByText('Revision 1').waitFor();
      expect(compareCalls).to.equal(0);
      await screenshot('reviewer-2-same-revision');

      await page.goto(`/compare?from=${suite.sheet.revisionId}&to=${fork.revisionId}`);
      const panel = page.getByTestId('review-panel');
      await panel.waitFor();
      await page.getByTestId('result-changes').waitFor();

      // Requesting changes needs a comment: refused on the page, nothing stored.
      await panel.getByTestId('verdict-changes').locator('input').check();
      await panel.getByTestId('send-verdict').click();
      await panel.getByText('Say which changes you are asking for.').waitFor();
      const priya = new ApiSession(suite.server.url);
      await priya.signIn(people.reviewer);
      expect((await priya.get<any>(`/api/revisions/${fork.revisionId}/reviews`)).reviews).to.have.length(0);
      await screenshot('reviewer-3-comment-required');

      // Approve the compared revision (the fork).
      await panel.getByTestId('verdict-approve').locator('input').check();
      await panel.getByTestId('verdict-comment').fill('99 % limits agree with the handbook table.');
      await panel.getByTestId('send-verdict').click();
      await panel.getByTestId('verdict-notice').waitFor();
      // The form folds away; a new verdict is one click.
      await panel.getByTestId('new-verdict').waitFor();
      await panel.locator('[data-testid="verdict"][data-verdict="approved"]').waitFor();
      // The badge on the compared revision's card.
      await page.locator('[data-testid="verdict-badge"][data-verdict="approved"]').first().waitFor();
      await screenshot('reviewer-4-approved');

      const stored = await priya.get<any>(`/api/revisions/${fork.revisionId}/reviews`);
      expect(stored.reviews).to.have.length(1);
      expect(stored.reviews[0].verdict).to.equal('approved');
      expect(stored.reviews[0].reviewer.name).to.equal('Priya Raman');
      expect(stored.reviews[0].contentHash).to.equal(fork.contentHash);
      expect((await priya.get<any>(`/api/revisions/${suite.sheet.revisionId}/reviews`)).reviews).to.have.length(0);
      // The verdict answered the request.
      expect(stored.requests[0].status).to.equal('answered');
      expect(stored.requests[0].verdictId).to.equal(stored.reviews[0].id);

      // The history of the fork shows the verdict badge on that revision.
      await page.goto(`/worksheets/${fork.worksheetId}/history`);
      await page.locator('[data-testid="revision"] [data-testid="verdict-badge"][data-verdict="approved"]').waitFor();
      await screenshot('reviewer-5-history-badge');
    });
  });

  it('reads well on a 360 px phone in dark mode', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: phone, colorScheme: 'dark' }, async ({ page, screenshot }) => {
      await signInThroughPage(page, people.reviewer, `/compare?from=${suite.sheet.revisionId}&to=${fork.revisionId}`);
      await page.getByTestId('result-changes').waitFor();
      await page.getByTestId('review-panel').waitFor();
      await page.getByTestId('pick-from').getByText('Revision 2').waitFor();
      const overflow = await page.evaluate('document.documentElement.scrollWidth - window.innerWidth');
      expect(overflow, 'the page does not scroll sideways').to.be.at.most(0);
      await screenshot('reviewer-phone-dark-compare');
    });
  });
});

/** The element's background differs from its row's: the new value is visibly marked. */
async function expectHighlighted(page: Page, mark: import('playwright-core').Locator): Promise<void> {
  // (The test code is type-checked without the DOM library, hence the loose types in the page function.)
  const colours = await mark.evaluate((el: any) => {
    const style = (globalThis as any).getComputedStyle;
    return [style(el).backgroundColor as string, style(el.closest('tr')).backgroundColor as string] as const;
  });
  expect(colours[0], 'highlight colour').to.not.match(/rgba\(0, 0, 0, 0\)|transparent/);
  expect(colours[0]).to.not.equal(colours[1]);
  void page;
}
