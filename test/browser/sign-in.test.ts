// End to end in Debian's Chromium against the real built server on a fresh seeded database:
// sign in as the demo owner, see the home page with the demo team, open the team page, sign out;
// a wrong password; the same pages at 360 px wide in the dark scheme. Every page is watched for
// console errors, CSP violations and outside requests (test/support/browser.ts).
// Reference: the demo seed and sign-in behaviour agreed in contracts.md.
import { expect } from 'chai';
import type { Page } from 'playwright-core';
import { desktop, phone, withPage } from '../support/browser';
import { browserSuite } from './browser-suite';

const owner = { email: 'ines.okafor@harrowvale.test', name: 'Ines Okafor' };
const demoPassword = 'spreadproof-demo';
const demoTeam = 'Metrology Lab';

async function signIn(page: Page, email: string, password: string): Promise<void> {
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
}

/** Fails when the page is wider than the viewport (something does not fit at this width). */
async function expectNoHorizontalScroll(page: Page, where: string): Promise<void> {
  // Expressions as strings: the tests are type-checked without the DOM library.
  const { scrollWidth, innerWidth } = await page.evaluate<{ scrollWidth: number; innerWidth: number }>(
    '({ scrollWidth: document.documentElement.scrollWidth, innerWidth: window.innerWidth })',
  );
  expect(scrollWidth, `${where}: page width ${scrollWidth} px in a ${innerWidth} px viewport`).to.be.at.most(innerWidth);
}

/** Waits until the self-hosted fonts are in use, so screenshots show the real type. */
async function fontsReady(page: Page): Promise<void> {
  await page.evaluate('document.fonts.ready.then(() => true)');
}

describe('browser: sign in, home, team page, sign out', function () {
  this.timeout(120_000);
  const suite = browserSuite({ server: { seed: true }, startTimeout: 180_000 });

  it('signs in as the demo owner, shows the team, opens the team page and signs out', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: desktop }, async ({ page, screenshot }) => {
      await page.goto('/');
      // Signed out, the home page sends the user to sign-in.
      await page.waitForURL('**/sign-in');
      await page.getByRole('heading', { name: 'Sign in' }).waitFor();
      await fontsReady(page);
      await screenshot('sign-in-desktop');

      await signIn(page, owner.email, demoPassword);
      await page.waitForURL((url) => url.pathname === '/');
      const teamLink = page.getByRole('link', { name: new RegExp(demoTeam) });
      await teamLink.waitFor();
      expect(await page.getByRole('heading', { level: 1 }).textContent()).to.contain('Welcome, Ines');
      expect(await page.getByTestId('user-menu').textContent()).to.contain(owner.name);
      expect(await teamLink.textContent()).to.contain('Owner');
      await fontsReady(page);
      await screenshot('home-desktop');

      await teamLink.click();
      await page.waitForURL('**/teams/*');
      await page.getByTestId('team-name').waitFor();
      expect(await page.getByTestId('team-name').textContent()).to.equal(demoTeam);
      const members = page.getByTestId('members').locator('li');
      await members.first().waitFor();
      expect(await members.count()).to.equal(4);
      const text = await page.getByTestId('members').textContent();
      for (const email of [
        'ines.okafor@harrowvale.test',
        'tomas.lindqvist@harrowvale.test',
        'priya.raman@harrowvale.test',
        'marc.delaunay@harrowvale.test',
      ]) {
        expect(text).to.contain(email);
      }
      // The owner manages members: a role selector per member and the add form.
      expect(await page.getByRole('combobox', { name: /Role of/ }).count()).to.equal(4);
      expect(await page.getByRole('heading', { name: 'Add a member' }).isVisible()).to.equal(true);
      await screenshot('team-desktop');

      await page.getByTestId('user-menu').click();
      await page.getByTestId('sign-out').waitFor();
      await screenshot('user-menu-desktop');
      await page.getByTestId('sign-out').click();
      await page.waitForURL('**/sign-in');
      expect(await page.getByTestId('user-menu').count()).to.equal(0);

      // Signed out for real: the home page is closed again.
      await page.goto('/');
      await page.waitForURL('**/sign-in');
    });
  });

  it('says clearly that a wrong password did not match, and stays on sign-in', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url }, async ({ page, screenshot, allowFailedResponse }) => {
      allowFailedResponse('/api/auth/signin', 401);
      await page.goto('/sign-in');
      await signIn(page, owner.email, 'not-the-password');
      const alert = page.getByTestId('form-error');
      await alert.waitFor();
      expect(await alert.textContent()).to.match(/do not match/);
      expect(new URL(page.url()).pathname).to.equal('/sign-in');
      // The e-mail stays for a second try.
      expect(await page.getByLabel('E-mail').inputValue()).to.equal(owner.email);
      await fontsReady(page);
      await screenshot('sign-in-wrong-password');
    });
  });

  it('sends the user to sign-in when the session ends, and back to the same page after signing in', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url }, async ({ page, context, allowFailedResponse }) => {
      await page.goto('/sign-in');
      await signIn(page, owner.email, demoPassword);
      const teamLink = page.getByRole('link', { name: new RegExp(demoTeam) });
      await teamLink.waitFor();
      const teamPath = await teamLink.getAttribute('href');
      expect(teamPath).to.match(/^\/teams\//);

      // The server-side session is gone (expired, or ended in another tab): the next API call
      // answers 401 and the app asks the user to sign in again.
      allowFailedResponse(/^\/api\//, 401);
      await context.clearCookies();
      await teamLink.click();
      await page.waitForURL((url) => url.pathname === '/sign-in' && url.searchParams.get('returnUrl') === teamPath);
      await signIn(page, owner.email, demoPassword);
      await page.waitForURL((url) => url.pathname === teamPath);
      await page.getByTestId('team-name').waitFor();
      expect(await page.getByTestId('team-name').textContent()).to.equal(demoTeam);
    });
  });

  it('shows field errors before sending an empty or invalid form', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url }, async ({ page }) => {
      await page.goto('/sign-in');
      await page.getByRole('button', { name: 'Sign in', exact: true }).click();
      await page.getByText('E-mail is required.').waitFor();
      await page.getByText('Password is required.').waitFor();
      await page.getByLabel('E-mail').fill('not-an-address');
      await page.getByLabel('E-mail').blur();
      await page.getByText(/Enter an e-mail address such as/).waitFor();
    });
  });

  it('fits a 360 px wide phone screen in the dark scheme', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: phone, colorScheme: 'dark' }, async ({ page, screenshot }) => {
      await page.goto('/sign-in');
      await page.getByRole('heading', { name: 'Sign in' }).waitFor();
      await fontsReady(page);
      await expectNoHorizontalScroll(page, 'sign-in');
      await screenshot('sign-in-phone-dark');

      await signIn(page, owner.email, demoPassword);
      const teamLink = page.getByRole('link', { name: new RegExp(demoTeam) });
      await teamLink.waitFor();
      await fontsReady(page);
      await expectNoHorizontalScroll(page, 'home');
      await screenshot('home-phone-dark');

      await teamLink.click();
      await page.getByTestId('team-name').waitFor();
      await page.getByTestId('members').locator('li').first().waitFor();
      await expectNoHorizontalScroll(page, 'team page');
      await screenshot('team-phone-dark');

      // The background really is dark: the body's computed colour is a dark tone.
      const background = await page.evaluate<string>('getComputedStyle(document.body).backgroundColor');
      const [r, g, b] = (background.match(/\d+(\.\d+)?/g) ?? []).map(Number);
      expect(r! + g! + b!, `dark background, got ${background}`).to.be.lessThan(3 * 80);
    });
  });
});
