// End to end in Debian's Chromium against the real built server (server/main.ts with its local mail
// server, as under `npm start`): the owner invites an address without an account as reviewer, the
// message arrives in the development mailbox, the link in it opens the invitation page, the
// newcomer creates the account there, and lands on the team page as a reviewer. Reference: the
// invitation flow of issue 6 (single-use expiring link, sign up from the link, member with the role).
import { expect } from 'chai';
import pg from 'pg';
import type { Page } from 'playwright-core';
import { phone, withPage } from '../support/browser';
import type { TestServer } from '../support/server';
import { browserSuite } from './browser-suite';

const demoPassword = 'spreadproof-demo';
const owner = 'ines.okafor@harrowvale.test';
const newcomer = 'nadia.quill@harrowvale.test';
const newcomerPassword = 'quiet lathe morning';

async function signIn(page: Page, email: string, password = demoPassword): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL((url) => url.pathname === '/');
}

/** Messages the local mail server stored, straight from the server's database. */
async function storedSubjects(server: TestServer, to: string): Promise<string[]> {
  const client = new pg.Client({ connectionString: server.databaseUrl });
  await client.connect();
  try {
    const { rows } = await client.query<{ subject: string }>(
      'select subject from dev_mailbox where $1 = any(envelope_to) order by received_at',
      [to],
    );
    return rows.map((r) => r.subject);
  } finally {
    await client.end();
  }
}

async function waitForMessage(server: TestServer, to: string, subject: RegExp): Promise<void> {
  const deadline = Date.now() + 20_000;
  while (Date.now() < deadline) {
    if ((await storedSubjects(server, to)).some((s) => subject.test(s))) return;
    await new Promise((resolve) => setTimeout(resolve, 200));
  }
  throw new Error(`No message to ${to} matching ${subject} within 20 s; stored: ${JSON.stringify(await storedSubjects(server, to))}`);
}

describe('browser: invitation by e-mail', function () {
  this.timeout(180_000);
  const suite = browserSuite({ server: { seed: true, env: { SMTP_URL: '', SITE_ADMINS: '' } }, startTimeout: 180_000 });

  it('invites a newcomer, who signs up from the mailed link and is a member with the given role', async () => {
    let link = '';
    let teamUrl = '';

    // The owner sends the invitation and finds it in the development mailbox.
    await withPage(suite.browser, { baseURL: suite.server.url }, async ({ page, screenshot }) => {
      await signIn(page, owner);
      await page.getByRole('link', { name: /Metrology Lab/ }).first().click();
      await page.waitForURL('**/teams/*');
      teamUrl = new URL(page.url()).pathname;
      const panel = page.getByTestId('invitations');
      await panel.getByLabel('E-mail address').fill(newcomer);
      await panel.getByRole('combobox', { name: 'Role' }).click();
      await page.getByRole('option', { name: 'Reviewer', exact: true }).click();
      await panel.getByRole('button', { name: 'Send invitation' }).click();
      await page.getByTestId('invitation-notice').waitFor();
      expect(await page.getByTestId('invitation-notice').textContent()).to.contain(`Invitation sent to ${newcomer} (reviewer)`);
      const pending = panel.locator(`li.invitation[data-email="${newcomer}"]`);
      await pending.waitFor();
      expect(await pending.textContent()).to.contain('Reviewer');
      await panel.scrollIntoViewIfNeeded();
      await screenshot('invitation-1-owner-sent');

      await waitForMessage(suite.server, newcomer, /invites you to “Metrology Lab” on Spreadproof/);
      await page.getByTestId('user-menu').click();
      await page.getByRole('menuitem', { name: 'Notification settings' }).click();
      await page.getByRole('link', { name: 'Open the mailbox' }).click();
      await page.waitForURL('**/dev/mailbox');
      await page.getByTestId('mailbox-filter').fill('nadia.quill');
      await page.getByRole('link', { name: /invites you to “Metrology Lab”/ }).click();
      await page.waitForURL('**/dev/mailbox/*');
      await page.getByTestId('message-text').waitFor();
      const anchor = page.getByTestId('message-text').locator('a[href*="/invitation#"]');
      expect(await anchor.count()).to.equal(1);
      link = (await anchor.getAttribute('href'))!;
      expect(new URL(link).origin).to.equal(new URL(suite.server.url).origin);
      await screenshot('invitation-2-mailbox-text');
      // The HTML part is shown in a sandboxed frame, without breaking the page's CSP.
      await page.getByRole('radio', { name: 'HTML' }).click();
      const frame = page.frameLocator('iframe.html');
      await frame.getByRole('link', { name: 'Create your account and join' }).waitFor();
      await screenshot('invitation-3-mailbox-html');
    });

    // The newcomer opens the link in a browser of their own, signs up there and is in the team.
    await withPage(suite.browser, { baseURL: suite.server.url }, async ({ page, screenshot }) => {
      await page.goto(link);
      await page.getByTestId('invitation').waitFor();
      expect(await page.getByRole('heading', { level: 1 }).textContent()).to.contain('Join Metrology Lab');
      expect(await page.getByTestId('invitation').textContent()).to.match(/Ines Okafor invites\s+nadia\.quill@harrowvale\.test\s+to join as\s+reviewer/);
      // The token has left the address bar.
      expect(new URL(page.url()).hash).to.equal('');
      await screenshot('invitation-4-newcomer-page');

      await page.getByLabel('Your name').fill('Nadia Quill');
      await page.getByLabel('Password', { exact: true }).fill(newcomerPassword);
      await page.getByRole('button', { name: 'Create account and join' }).click();
      await page.waitForURL((url) => url.pathname === teamUrl);
      await page.getByTestId('team-name').waitFor();
      expect(await page.getByTestId('team-name').textContent()).to.equal('Metrology Lab');
      expect(await page.locator('.head').textContent()).to.contain('You are reviewer in this team');
      const me = page.locator(`li.member[data-email="${newcomer}"]`);
      await me.waitFor();
      expect(await me.textContent()).to.contain('Nadia Quill');
      expect(await me.textContent()).to.contain('Reviewer');
      await screenshot('invitation-5-newcomer-member');
    });

    // The link worked once; the owner heard of the new member; the account signs in.
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: phone }, async ({ page, screenshot, allowFailedResponse }) => {
      allowFailedResponse('/api/invitations/lookup', 410);
      await page.goto(link);
      await page.getByTestId('link-error').waitFor();
      expect(await page.getByTestId('link-error').textContent()).to.contain('already been accepted');
      await screenshot('invitation-6-used-link-phone');
      await signIn(page, newcomer, newcomerPassword);
    });
    await waitForMessage(suite.server, owner, /Nadia Quill joined “Metrology Lab”/);
  });
});
