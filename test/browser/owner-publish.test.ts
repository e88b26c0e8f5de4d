/**
 * Way of use 4 — the owner: publishes a revision; a fresh browser without sign-in opens the link
 * and sees the results, formulas' numbers and the cautions; after the owner revokes the link, the
 * same address shows a clear "no longer available" page, and an unknown link a "not found" page.
 *
 * The published interval is checked against the NIST/SEMATECH e-Handbook limits for sigma of
 * GEAR.DAT at 95 %: 0.00551 – 0.00729.
 */
import { expect } from 'chai';
import type { Page } from 'playwright-core';
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

describe('Owner: publishes a revision and revokes the link', function () {
  this.timeout(240_000);
  const suite = gearBrowserSuite();

  it('publishes; a reader without sign-in sees the results; after revoking, a clear "no longer available" page', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: desktop }, async ({ page, screenshot }) => {
      await signInThroughPage(page, people.analyst, `/revisions/${suite.sheet.revisionId}`);
      await page.locator('[data-testid="sheet"] [data-step-id="sigma"]').waitFor();
      await page.getByTestId('open-publish').click();
      const dialog = page.getByRole('dialog');
      await dialog.getByTestId('create-link').click();
      const linkField = dialog.getByTestId('public-link');
      await linkField.waitFor();
      const link = await linkField.inputValue();
      const url = new URL(link);
      expect(url.origin).to.equal(new URL(suite.server.url).origin);
      expect(url.pathname).to.match(/^\/p\/[A-Za-z0-9_-]{43}$/);
      await dialog.getByTestId('copy-link').click();
      await dialog.getByText('Copied').first().waitFor();
      await dialog.locator('[data-testid="link-item"][data-state="active"]').waitFor();
      await screenshot('owner-1-publish-dialog');

      // A reader with no account, in a browser of their own.
      await withPage(suite.browser, { baseURL: suite.server.url, viewport: desktop }, async (reader) => {
        await reader.page.goto(url.pathname);
        await reader.page.getByTestId('published-title').waitFor();
        expect(await reader.page.getByTestId('published-title').innerText()).to.equal('Gear diameter spread');
        expect(await reader.page.getByTestId('published-revision').innerText()).to.equal(String(suite.sheet.revisionNumber));
        expect(await reader.page.getByTestId('published-content-hash').innerText()).to.equal(suite.sheet.contentHash);
        const interval = await shownSigmaInterval(reader.page);
        expect(matchesPrinted(interval.lower, handbookSigmaLimits[0.95].lower), `lower ${interval.lower}`).to.equal(true);
        expect(matchesPrinted(interval.upper, handbookSigmaLimits[0.95].upper), `upper ${interval.upper}`).to.equal(true);
        const cautions = await reader.page.getByTestId('published-cautions').innerText();
        expect(cautions).to.contain('do not replace, qualified judgement');
        expect(cautions).to.contain('quality system');
        expect(cautions).to.contain('applicable standards');
        expect(cautions).to.contain('independent observations');
        expect(cautions).to.contain('normally distributed');
        // Nothing of the team shows: no author, no e-mail, no account menu.
        const text = await reader.page.locator('body').innerText();
        expect(text).to.not.contain('Ines Okafor');
        expect(text).to.not.contain('@harrowvale.test');
        expect(await reader.page.getByTestId('user-menu').count()).to.equal(0);
        await reader.screenshot('owner-2-published-view');

        // As a printed report: no app bar, no print button.
        await reader.page.emulateMedia({ media: 'print' });
        expect(await reader.page.locator('sp-top-bar').isVisible()).to.equal(false);
        expect(await reader.page.getByRole('button', { name: 'Print or save as PDF' }).isVisible()).to.equal(false);
        await reader.screenshot('owner-3-published-print');
        await reader.page.emulateMedia({ media: 'screen' });
      });

      // The same link on a phone in dark mode.
      await withPage(suite.browser, { baseURL: suite.server.url, viewport: phone, colorScheme: 'dark' }, async (reader) => {
        await reader.page.goto(url.pathname);
        await reader.page.getByTestId('published-title').waitFor();
        await expectNoSideways(reader.page);
        await reader.screenshot('owner-4-published-phone-dark');
      });

      // Back in the owner's dialog: revoke the link.
      await dialog.getByTestId('revoke-link').click();
      await dialog.getByTestId('confirm-revoke').click();
      await dialog.locator('[data-testid="link-item"][data-state="revoked"]').waitFor();
      await dialog.getByText('no longer available').first().waitFor();
      await screenshot('owner-5-revoked');

      await withPage(suite.browser, { baseURL: suite.server.url, viewport: desktop }, async (reader) => {
        reader.allowFailedResponse(url.pathname.replace('/p/', '/api/public/'), 410);
        await reader.page.goto(url.pathname);
        await reader.page.getByTestId('published-revoked').waitFor();
        expect(await reader.page.getByRole('heading', { level: 1 }).innerText()).to.equal('This link is no longer available');
        expect(await reader.page.locator('[data-testid="sheet"]').count()).to.equal(0);
        await reader.screenshot('owner-6-link-revoked');

        // An address that was never published.
        const unknown = `/p/${'A'.repeat(43)}`;
        reader.allowFailedResponse(unknown.replace('/p/', '/api/public/'), 404);
        await reader.page.goto(unknown);
        await reader.page.getByTestId('published-not-found').waitFor();
        await reader.screenshot('owner-7-link-unknown');
      });

      // The stored link says revoked.
      const ines = new ApiSession(suite.server.url);
      await ines.signIn(people.analyst);
      const links = await ines.get<any>(`/api/worksheets/${suite.sheet.worksheetId}/links`);
      expect(links.items).to.have.length(1);
      expect(links.items[0].revokedAt).to.be.a('string');
    });
  });

  it('shows the owner the published marker in the history, and the team page the audit trail', async () => {
    const ines = new ApiSession(suite.server.url);
    await ines.signIn(people.analyst);
    await ines.post(`/api/revisions/${suite.sheet.revisionId}/links`, {});
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: desktop }, async ({ page, screenshot }) => {
      await signInThroughPage(page, people.analyst, `/worksheets/${suite.sheet.worksheetId}/history`);
      await page.locator(`[data-testid="revision"][data-revision-number="${suite.sheet.revisionNumber}"] [data-testid="published-marker"]`).waitFor();
      await screenshot('owner-8-history-published');

      await page.goto(`/teams/${suite.sheet.teamId}`);
      const audit = page.getByTestId('audit-trail');
      await audit.locator('[data-testid="audit-event"][data-action="link.publish"]').first().waitFor();
      expect(await audit.locator('[data-testid="audit-event"][data-action="revision.save"]').count()).to.be.greaterThan(0);
      await page.getByTestId('archived-worksheets').waitFor();
      await screenshot('owner-9-team-audit');
    });
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: phone, colorScheme: 'dark' }, async ({ page, screenshot }) => {
      await signInThroughPage(page, people.analyst, `/teams/${suite.sheet.teamId}`);
      await page.getByTestId('audit-trail').locator('[data-testid="audit-event"]').first().waitFor();
      await expectNoSideways(page);
      await screenshot('owner-10-team-phone-dark');
    });
  });
});

async function expectNoSideways(page: Page): Promise<void> {
  const overflow = await page.evaluate('document.documentElement.scrollWidth - window.innerWidth');
  expect(overflow, 'the page does not scroll sideways').to.be.at.most(0);
}
