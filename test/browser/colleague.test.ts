/**
 * Way of use 2 — the colleague: opens the analyst's revision from the worksheet's history, reads
 * it at 99 % without changing it, forks it at 99 % in one action and sees the wider interval.
 *
 * Checked against the NIST/SEMATECH e-Handbook confidence limits for sigma of GEAR.DAT (N = 100):
 * 95 %: 0.00551 – 0.00729, 99 %: 0.00530 – 0.00766 (printed to 3 significant digits).
 */
import { expect } from 'chai';
import { desktop, phone, withPage } from '../support/browser';
import {
  ApiSession,
  gearBrowserSuite,
  handbookSigmaLimits,
  matchesPrinted,
  people,
  shownSigmaInterval,
  signInThroughPage,
} from './collaboration-setup';

describe('Colleague: reads a revision at 99 % and forks it', function () {
  this.timeout(240_000);
  const suite = gearBrowserSuite();

  it('opens the revision from the history, views it at 99 %, forks at 99 % and sees the wider interval', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: desktop }, async ({ page, screenshot }) => {
      await signInThroughPage(page, people.colleague, `/worksheets/${suite.sheet.worksheetId}/history`);

      // The timeline: the analyst's revision with its author, message and short hash.
      const entry = page.locator(`[data-testid="revision"][data-revision-number="${suite.sheet.revisionNumber}"]`);
      await entry.waitFor();
      const entryText = await entry.innerText();
      expect(entryText).to.contain('Ines Okafor');
      expect(entryText).to.contain('sigma interval at 95 %');
      expect(entryText).to.contain(suite.sheet.contentHash.slice(0, 10));
      expect(await page.locator('[data-testid="revision"]').count()).to.equal(2);
      await screenshot('colleague-1-history');

      await entry.getByRole('link', { name: `Open revision ${suite.sheet.revisionNumber} read-only` }).click();
      await page.waitForURL(`**/revisions/${suite.sheet.revisionId}`);
      await page.locator('[data-testid="sheet"][data-level="saved"] [data-step-id="sigma"]').waitFor();
      const saved = await shownSigmaInterval(page);
      expect(matchesPrinted(saved.lower, handbookSigmaLimits[0.95].lower), `95 % lower ${saved.lower}`).to.equal(true);
      expect(matchesPrinted(saved.upper, handbookSigmaLimits[0.95].upper), `95 % upper ${saved.upper}`).to.equal(true);
      expect(await page.getByTestId('revision-title').innerText()).to.equal('Gear diameter spread');
      await screenshot('colleague-2-revision-as-saved');

      // Re-check against today's engine: the stored results are reproduced byte for byte.
      await page.getByTestId('recheck').click();
      const recheck = page.getByTestId('recheck-result');
      await recheck.waitFor();
      expect(await recheck.getAttribute('data-matches')).to.equal('true');
      expect(await recheck.innerText()).to.contain('Reproduced');

      // A typed level outside (0, 100 %) is refused on the page, before any evaluation.
      let evaluations = 0;
      page.on('request', (request) => {
        if (request.method() === 'POST' && request.url().endsWith('/evaluate')) evaluations += 1;
      });
      await page.locator('[data-testid="level-choice"] [data-level="other"] button').click();
      await page.getByTestId('typed-level').fill('150');
      await page.getByRole('button', { name: 'Apply' }).click();
      await page.getByText('Type a level between 0 and 100 %').first().waitFor();
      expect(evaluations, 'no evaluation for a refused level').to.equal(0);

      // Read at 99 %: a draft evaluation, clearly marked as not saved.
      await page.locator('[data-testid="level-choice"] [data-level="0.99"] button').click();
      const banner = page.getByTestId('what-if-banner');
      await banner.getByText('not saved').waitFor();
      await page.locator('[data-testid="sheet"][data-level="0.99"] [data-step-id="sigma"]').waitFor();
      const whatIf = await shownSigmaInterval(page);
      expect(matchesPrinted(whatIf.lower, handbookSigmaLimits[0.99].lower), `99 % lower ${whatIf.lower}`).to.equal(true);
      expect(matchesPrinted(whatIf.upper, handbookSigmaLimits[0.99].upper), `99 % upper ${whatIf.upper}`).to.equal(true);
      expect(evaluations).to.be.greaterThan(0);
      await screenshot('colleague-3-viewed-at-99');

      // Fork at 99 % in one action: lands on the fork's first revision.
      await banner.getByRole('button', { name: 'Fork at 99 %' }).click();
      await page.waitForURL((url) => url.pathname.startsWith('/revisions/') && !url.pathname.endsWith(suite.sheet.revisionId));
      await page.locator('[data-testid="sheet"][data-level="saved"] [data-step-id="sigma"]').waitFor();
      const forked = await shownSigmaInterval(page);
      expect(matchesPrinted(forked.lower, handbookSigmaLimits[0.99].lower), `fork lower ${forked.lower}`).to.equal(true);
      expect(matchesPrinted(forked.upper, handbookSigmaLimits[0.99].upper), `fork upper ${forked.upper}`).to.equal(true);
      expect(forked.upper - forked.lower, 'the 99 % interval is wider than the 95 % one').to.be.greaterThan(saved.upper - saved.lower);
      expect(forked.lower).to.be.lessThan(saved.lower);
      expect(forked.upper).to.be.greaterThan(saved.upper);
      const origin = await page.getByTestId('fork-origin').innerText();
      expect(origin).to.contain('Gear diameter spread, revision 2');
      expect(await page.getByTestId('revision-title').innerText()).to.equal('Gear diameter spread at 99 %');
      await screenshot('colleague-4-fork-at-99');

      // Ask the team's reviewer to look at the fork.
      const panel = page.getByTestId('review-panel');
      await panel.getByTestId('ask-review').click();
      await panel.getByTestId('reviewer-select').click();
      await page.getByRole('option', { name: /Priya Raman/ }).click();
      await panel.getByLabel('Message (optional)').fill('Same data, read at 99 %.');
      await panel.getByRole('button', { name: 'Send request' }).click();
      await panel.locator('[data-testid="review-request"]').getByText('Priya Raman').waitFor();
      await screenshot('colleague-5-review-requested');

      // What was stored: a new worksheet whose origin is the analyst's revision, at 99 % throughout.
      const forkRevisionId = new URL(page.url()).pathname.split('/').pop()!;
      const tomas = new ApiSession(suite.server.url);
      await tomas.signIn(people.colleague);
      const stored = await tomas.get<any>(`/api/revisions/${forkRevisionId}`);
      expect(stored.worksheet.origin.revisionId).to.equal(suite.sheet.revisionId);
      expect(stored.revision.author.name).to.equal('Tomas Lindqvist');
      const steps = stored.revision.document.steps as { id: string; params: Record<string, unknown> }[];
      expect(steps.find((s) => s.id === 'sigma')!.params['levels']).to.deep.equal([0.99]);
      expect(steps.find((s) => s.id === 'target')!.params['alpha']).to.equal(0.01);
      const reviews = await tomas.get<any>(`/api/revisions/${forkRevisionId}/reviews`);
      expect(reviews.requests).to.have.length(1);
      expect(reviews.requests[0].reviewer.name).to.equal('Priya Raman');
      expect(reviews.requests[0].status).to.equal('open');
      // The analyst's worksheet is untouched.
      const original = await tomas.get<any>(`/api/revisions/${suite.sheet.revisionId}`);
      expect(original.isHead).to.equal(true);
      expect(original.revision.contentHash).to.equal(suite.sheet.contentHash);
    });
  });

  it('reads well on a 360 px phone in dark mode', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: phone, colorScheme: 'dark' }, async ({ page, screenshot }) => {
      await signInThroughPage(page, people.colleague, `/worksheets/${suite.sheet.worksheetId}/history`);
      await page.locator('[data-testid="revision"]').first().waitFor();
      await expectNoSideways(page);
      await screenshot('colleague-phone-dark-history');
      await page.goto(`/revisions/${suite.sheet.revisionId}`);
      await page.locator('[data-testid="sheet"] [data-step-id="sigma"]').waitFor();
      await page.locator('[data-testid="level-choice"] [data-level="0.99"] button').click();
      await page.getByTestId('what-if-banner').getByText('not saved').waitFor();
      await expectNoSideways(page);
      await screenshot('colleague-phone-dark-revision');
    });
  });
});

async function expectNoSideways(page: import('playwright-core').Page): Promise<void> {
  const overflow = await page.evaluate('document.documentElement.scrollWidth - window.innerWidth');
  expect(overflow, 'the page does not scroll sideways').to.be.at.most(0);
}
