// End to end in Debian's Chromium against the real built server on a fresh seeded database:
// creating a team, adding, re-roling and removing a member as its owner, the last-owner rule, and
// sign-up with field errors from the form and from the server. Reference: the team and sign-up
// behaviour agreed in contracts.md (owner-only member management, unknown e-mail → 404, last owner
// → 409 last_owner, password ≥ 10 characters, validation details per field).
import { expect } from 'chai';
import type { Page } from 'playwright-core';
import { phone, withPage } from '../support/browser';
import { browserSuite } from './browser-suite';

const demoPassword = 'spreadproof-demo';

async function signIn(page: Page, email: string): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(demoPassword);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL((url) => url.pathname === '/');
}

async function chooseRole(page: Page, memberName: string, role: string): Promise<void> {
  await page.getByRole('combobox', { name: `Role of ${memberName}` }).click();
  await page.getByRole('option', { name: role, exact: true }).click();
}

function memberRow(page: Page, email: string) {
  return page.locator(`li.member[data-email="${email}"]`);
}

describe('browser: teams and sign-up', function () {
  this.timeout(120_000);
  const suite = browserSuite({ server: { seed: true }, startTimeout: 180_000 });

  it('lets an owner create a team, add a member, change the role and remove the member', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url }, async ({ page, screenshot, allowFailedResponse }) => {
      await signIn(page, 'ines.okafor@harrowvale.test');

      // An empty name is refused by the form before anything is sent.
      await page.getByRole('button', { name: 'Create' }).click();
      await page.getByText('Team name is required.').waitFor();

      // The first attempt goes out with a stale CSRF token (as from a tab left open across a
      // sign-in elsewhere): the server refuses it with 403 csrf, and the client re-reads the session
      // and sends it again, so the user sees the team created, not an error.
      allowFailedResponse('/api/teams', 403);
      const sentTokens: string[] = [];
      await page.route('**/api/teams', async (route) => {
        const request = route.request();
        if (request.method() !== 'POST') return route.continue();
        sentTokens.push(request.headers()['x-csrf-token'] ?? '');
        if (sentTokens.length > 1) return route.continue();
        return route.continue({ headers: { ...request.headers(), 'x-csrf-token': 'stale-token' } });
      });
      await page.getByLabel('Team name').fill('Gauge Studies');
      await page.getByRole('button', { name: 'Create' }).click();
      await page.waitForURL('**/teams/*');
      expect(sentTokens.length, 'one refused attempt, one retry').to.equal(2);
      expect(sentTokens[1], 'the retry carries a token').to.have.length.greaterThan(10);
      await page.getByTestId('team-name').waitFor();
      expect(await page.getByTestId('team-name').textContent()).to.equal('Gauge Studies');
      expect(await page.getByTestId('members').locator('li').count()).to.equal(1);

      // Only existing accounts can be added: the answer is shown on the e-mail field.
      allowFailedResponse(/^\/api\/teams\/[^/]+\/members$/, 404);
      await page.getByLabel('E-mail of their account').fill('nobody@harrowvale.test');
      await page.getByRole('button', { name: 'Add member' }).click();
      const emailError = page.locator('form mat-error').filter({ hasText: /account uses this e-mail/i });
      await emailError.waitFor();
      await screenshot('team-add-unknown-email');

      await page.getByLabel('E-mail of their account').fill('priya.raman@harrowvale.test');
      await page.getByRole('button', { name: 'Add member' }).click();
      const priya = memberRow(page, 'priya.raman@harrowvale.test');
      await priya.waitFor();
      await page.getByText('Priya Raman was added as editor.').waitFor();
      expect(await page.getByRole('combobox', { name: 'Role of Priya Raman' }).textContent()).to.contain('Editor');

      await chooseRole(page, 'Priya Raman', 'Reviewer');
      await page.getByText('Priya Raman is now reviewer.').waitFor();
      // Re-read from the server, not just the selector's own state.
      await page.reload();
      await page.getByRole('combobox', { name: 'Role of Priya Raman' }).waitFor();
      expect(await page.getByRole('combobox', { name: 'Role of Priya Raman' }).textContent()).to.contain('Reviewer');
      await screenshot('team-two-members');

      await page.getByRole('button', { name: 'Remove Priya Raman from the team' }).click();
      await page.getByText('Remove Priya Raman from Gauge Studies?').waitFor();
      await screenshot('team-confirm-removal');
      await page.getByRole('button', { name: 'Remove', exact: true }).click();
      await page.getByText('Priya Raman was removed from the team.').waitFor();
      await priya.waitFor({ state: 'detached' });
    });
  });

  it('shows the last-owner rule when the only owner tries to step down or leave', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: phone }, async ({ page, screenshot, allowFailedResponse }) => {
      allowFailedResponse(/^\/api\/teams\/[^/]+\/members\/[^/]+$/, 409);
      await signIn(page, 'ines.okafor@harrowvale.test');
      await page.getByRole('link', { name: /Metrology Lab/ }).click();
      await page.getByTestId('team-name').waitFor();

      await chooseRole(page, 'Ines Okafor', 'Editor');
      const error = page.getByTestId('member-error');
      await error.waitFor();
      expect(await error.textContent()).to.match(/needs at least one owner/);
      // The selector returns to the role the server kept.
      expect(await page.getByRole('combobox', { name: 'Role of Ines Okafor' }).textContent()).to.contain('Owner');
      await screenshot('team-last-owner-phone');

      await page.getByRole('button', { name: 'Remove Ines Okafor from the team' }).click();
      await page.getByRole('button', { name: 'Leave', exact: true }).click();
      await page.getByTestId('member-error').getByText(/Could not remove the member: a team needs at least one owner/).waitFor();
      expect(new URL(page.url()).pathname).to.match(/^\/teams\//);
    });
  });

  it('shows a member who is not an owner the members without the controls', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url }, async ({ page }) => {
      await signIn(page, 'marc.delaunay@harrowvale.test');
      await page.getByRole('link', { name: /Metrology Lab/ }).click();
      await page.getByTestId('members').locator('li').first().waitFor();
      expect(await page.getByTestId('members').locator('li').count()).to.equal(4);
      expect(await page.getByRole('combobox').count()).to.equal(0);
      expect(await page.getByRole('heading', { name: 'Add a member' }).count()).to.equal(0);
      expect(await page.getByText('You are viewer in this team').count()).to.equal(1);
    });
  });

  it('signs up with field errors from the form and from the server, then lands on home', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url }, async ({ page, screenshot, allowFailedResponse }) => {
      allowFailedResponse('/api/auth/signup', 400);
      allowFailedResponse('/api/auth/signup', 409);
      await page.goto('/sign-in');
      await page.getByRole('link', { name: 'Create an account' }).click();
      await page.waitForURL('**/sign-up');

      await page.getByLabel('Name').fill('Noor Castellan');
      await page.getByLabel('E-mail').fill('noor.castellan@harrowvale.test');
      await page.getByLabel('Password', { exact: true }).fill('short');
      await page.getByRole('button', { name: 'Create account' }).click();
      await page.getByText('Password must have at least 10 characters (5 so far).').waitFor();
      await screenshot('sign-up-short-password');

      // An address the form accepts but the server does not (no top-level domain): the server's
      // message appears on the e-mail field.
      await page.getByLabel('E-mail').fill('noor@harrowvale');
      await page.getByLabel('Password', { exact: true }).fill('gauge block stack');
      await page.getByRole('button', { name: 'Create account' }).click();
      await page.getByText('Enter a valid e-mail address.').waitFor();
      expect(await page.getByTestId('form-error').count(), 'no duplicate message above the form').to.equal(0);
      await screenshot('sign-up-server-field-error');

      // An e-mail in use: shown on the field too.
      await page.getByLabel('E-mail').fill('tomas.lindqvist@harrowvale.test');
      await page.getByRole('button', { name: 'Create account' }).click();
      await page.getByText('An account with this e-mail address already exists.').waitFor();

      await page.getByLabel('E-mail').fill('noor.castellan@harrowvale.test');
      await page.getByRole('button', { name: 'Create account' }).click();
      await page.waitForURL((url) => url.pathname === '/');
      await page.getByText('You are not in a team yet.').waitFor();
      expect(await page.getByTestId('user-menu').textContent()).to.contain('Noor Castellan');
    });
  });
});
