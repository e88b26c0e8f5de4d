// The analyst's way of use, end to end in Debian's Chromium against the real built server on a
// fresh seeded database: sign in, create a worksheet, upload a CSV of readings, add a spread
// summary, a sigma interval, a target test and a normality check, see the numbers, the typeset
// formulas (KaTeX markup) and the plots (Vega SVG), save a revision. Then bad inputs (a confidence
// level out of range, a file that is not a table, a pasted table with a broken quote) and their
// messages; a draft that survives a reload; a failed normality check that flags the interval; and
// the editor at 360 px in the dark scheme. Every page is watched for console errors and CSP
// violations (test/support/browser.ts).
//
// The readings are invented demo data (Harrow Vale Precision). The numbers checked against them
// are computed here from the same values with the textbook formulas (sample variance with divisor
// n − 1), so the test fails if the page shows anything else.
import { expect } from 'chai';
import type { Locator, Page } from 'playwright-core';
import { desktop, phone, withPage } from '../support/browser';
import { browserSuite } from './browser-suite';

const analyst = { email: 'ines.okafor@harrowvale.test', name: 'Ines Okafor' };
const demoPassword = 'spreadproof-demo';

/** Bore gauge BG-07, 20 repeat readings on a setting ring, deviation from nominal in um (invented). */
const readings = [1.33, 1.45, 0.92, 0.97, 0.92, 0.8, 1.01, 0.7, 0.51, 1.4, 1.09, 0.26, 0.7, 0.7, 0.93, 0.18, 0.17, 0.3, 0.61, 1.16];
const csv = `reading,operator\n${readings.map((r, i) => `${r},${i % 2 === 0 ? 'A' : 'B'}`).join('\n')}\n`;

function sampleSd(values: readonly number[]): number {
  const mean = values.reduce((a, b) => a + b, 0) / values.length;
  const ss = values.reduce((a, b) => a + (b - mean) ** 2, 0);
  return Math.sqrt(ss / (values.length - 1));
}

async function signIn(page: Page): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(analyst.email);
  await page.getByLabel('Password', { exact: true }).fill(demoPassword);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL((url) => url.pathname === '/');
}

/** Waits for the self-hosted fonts and scrolls to the top (the worksheet bar is sticky). */
async function fontsReady(page: Page): Promise<void> {
  await page.evaluate('document.fonts.ready.then(() => true)');
  await page.evaluate('window.scrollTo(0, 0)');
  await page.waitForTimeout(100);
}

async function expectNoHorizontalScroll(page: Page, where: string): Promise<void> {
  const { scrollWidth, innerWidth } = await page.evaluate<{ scrollWidth: number; innerWidth: number }>(
    '({ scrollWidth: document.documentElement.scrollWidth, innerWidth: window.innerWidth })',
  );
  expect(scrollWidth, `${where}: page width ${scrollWidth} px in a ${innerWidth} px viewport`).to.be.at.most(innerWidth);
}

/** Creates a blank worksheet from the home page and waits for its editor. */
async function createWorksheet(page: Page, title: string): Promise<string> {
  await page.getByTestId('new-worksheet').click();
  await page.getByTestId('new-title').fill(title);
  await page.getByTestId('new-create').click();
  // The first evaluation after the server starts also starts its worker threads: allow for it.
  await page.waitForURL(/\/worksheets\/[0-9a-f-]{36}$/, { timeout: 120_000 });
  await page.getByTestId('worksheet-title').waitFor();
  return new URL(page.url()).pathname.split('/').pop()!;
}

/** Adds a step of a kind through the add-step menu and returns its card. */
async function addStep(page: Page, kind: string): Promise<Locator> {
  const before = await page.locator('sp-step-card').count();
  await page.getByTestId('add-step').click();
  await page.locator(`.add-menu button[data-kind="${kind}"]`).click();
  await page.locator('sp-step-card').nth(before).waitFor();
  return page.locator('sp-step-card').nth(before);
}

/** Waits until the card shows a value with this id and returns its displayed number. */
async function valueOf(card: Locator, id: string): Promise<string> {
  const value = card.locator(`[data-value-id="${id}"] .num`).first();
  await value.waitFor({ timeout: 20_000 });
  return (await value.textContent())!.trim();
}

/**
 * Waits until the live preview of the current draft has arrived (no evaluation pending). Polled
 * from here: waitForFunction with a string would need eval in the page, which the CSP forbids.
 */
async function previewSettled(page: Page): Promise<void> {
  const state = page.getByTestId('draft-state');
  const deadline = Date.now() + 20_000;
  await page.waitForTimeout(500); // the debounce before an evaluation starts
  for (;;) {
    const text = (await state.textContent()) ?? '';
    if (!/Evaluating|pending/.test(text)) break;
    if (Date.now() > deadline) throw new Error(`The preview did not settle: "${text}"`);
    await page.waitForTimeout(100);
  }
  await page.waitForTimeout(150);
}

describe('browser: the analyst builds, checks and saves a worksheet', function () {
  this.timeout(240_000);
  const suite = browserSuite({ server: { seed: true }, startTimeout: 180_000 });

  it('creates a worksheet, uploads a CSV, adds four analysis steps, sees numbers, formulas and plots, saves', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: desktop }, async ({ page, screenshot }) => {
      await signIn(page);
      await page.getByTestId('worksheet-table').waitFor();
      await fontsReady(page);
      await screenshot('analyst-01-home');

      await createWorksheet(page, 'BG-07 repeatability, line 3');
      expect(await page.getByTestId('draft-state').textContent()).to.contain('Saved');
      await fontsReady(page);
      await screenshot('analyst-02-empty-worksheet');

      // Data: upload the CSV with a progress bar; the file's rows show in the preview.
      await page.getByRole('button', { name: 'Add a Data step' }).click();
      const data = page.locator('sp-step-card').first();
      await data.getByTestId('upload-input').setInputFiles({ name: 'bg07-readings.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
      await data.getByTestId('dataset-name').waitFor({ timeout: 20_000 });
      expect(await data.getByTestId('dataset-name').textContent()).to.contain('bg07-readings.csv');
      await data.getByTestId('table-preview').locator('td').first().waitFor({ timeout: 20_000 });
      expect(await data.getByTestId('table-preview').textContent()).to.contain('1.33');
      // Unit of the readings.
      await data.getByLabel('Unit of column reading').fill('um');
      await data.getByLabel('Unit of column reading').press('Tab');
      await previewSettled(page);
      await fontsReady(page);
      await screenshot('analyst-03-data-uploaded');

      // Spread summary: n and s computed here from the same readings.
      const spread = await addStep(page, 'spread-summary');
      await previewSettled(page);
      expect(await valueOf(spread, 'n')).to.equal(String(readings.length));
      const sd = sampleSd(readings);
      const shownSd = Number(await valueOf(spread, 'sd'));
      expect(Math.abs(shownSd - sd), `sd shown ${shownSd}, computed ${sd}`).to.be.below(5e-4 * sd);

      // Sigma interval, target test (required sigma 0.5 um), normality check.
      const interval = await addStep(page, 'sigma-interval');
      const test = await addStep(page, 'target-test');
      await test.getByLabel('Required standard deviation σ₀').fill('0.5');
      const normality = await addStep(page, 'normality-check');
      await previewSettled(page);

      // Numbers with units, in the monospaced face.
      await valueOf(interval, 'chisq.0.95.upper').catch(() => valueOf(interval, 'sd'));
      const intervalValues = await interval.locator('sp-value-list .num').allTextContents();
      expect(intervalValues.length, 'interval values shown').to.be.greaterThan(0);
      const font = await page.evaluate<string>(`getComputedStyle(document.querySelector('sp-value-list .num')).fontFamily`);
      expect(font).to.contain('JetBrains Mono');
      expect(await test.locator('[data-conclusion]').count(), 'test conclusions').to.be.greaterThan(0);
      expect(await normality.locator('sp-value-list .num').count(), 'normality statistics').to.be.greaterThan(0);

      // Formulas typeset by KaTeX (symbolic and substituted) and plots drawn by Vega as SVG.
      await interval.locator('[data-testid="formula"] .katex').first().waitFor({ timeout: 20_000 });
      expect(await interval.locator('[data-testid="formula"] .katex').count()).to.be.at.least(2);
      expect(await interval.locator('[data-testid="formula"] .katex-mathml math').count()).to.be.at.least(1);
      await test.locator('[data-testid="plot"] svg').first().waitFor({ timeout: 30_000 });
      await normality.locator('[data-testid="plot"] svg').first().waitFor({ timeout: 30_000 });
      expect(await spread.locator('[data-testid="plot"] svg, [data-testid="plot"] canvas').count()).to.be.at.least(1);

      // The edits are an unsaved preview until saved.
      expect(await interval.getByTestId('unsaved-badge').count()).to.equal(1);
      await page.waitForTimeout(400); // let the plots settle for the screenshot
      await fontsReady(page);
      await screenshot('analyst-04-findings-unsaved');

      // Save with Ctrl+S and a message.
      await page.locator('body').press('Control+s');
      await page.getByTestId('save-message').fill('Repeatability of BG-07 against the 0.5 um requirement');
      await page.getByTestId('save-confirm').click();
      // The notice fades after a while: wait for it and its text in one go.
      await page.getByTestId('notice').filter({ hasText: 'Saved as revision 2.' }).waitFor({ timeout: 90_000 });
      expect(await page.getByTestId('draft-state').textContent()).to.contain('Saved');
      expect(await page.getByTestId('unsaved-badge').count()).to.equal(0);
      // The saved revision still shows its findings.
      await interval.locator('[data-testid="formula"] .katex').first().waitFor();
      await fontsReady(page);
      await screenshot('analyst-05-saved');

      // What-if at 99 % without editing: the banner says it is not part of the worksheet.
      await interval.locator('mat-button-toggle[data-level="0.99"] button').click();
      await interval.getByTestId('what-if-banner').waitFor();
      await interval.getByTestId('what-if-result').locator('sp-value-list .num').first().waitFor({ timeout: 20_000 });
      expect(await page.getByTestId('draft-state').textContent()).to.contain('Saved');
      await fontsReady(page);
      await screenshot('analyst-06-what-if-99');

      // Home lists it with its last revision; an exported file imports as a new worksheet.
      const worksheetId = new URL(page.url()).pathname.split('/').pop()!;
      const exported = await page.request.get(`/api/worksheets/${worksheetId}/export`);
      expect(exported.status()).to.equal(200);
      const exportBytes = await exported.body();
      await page.getByRole('link', { name: 'Spreadproof home' }).click();
      const row = page.getByTestId('worksheet-table').locator('tr', { hasText: 'BG-07 repeatability, line 3' });
      await row.waitFor();
      expect(await row.textContent()).to.contain('Ines Okafor');
      await page.getByTestId('import-worksheet').click();
      await page.getByTestId('import-input').setInputFiles({ name: 'bg07.spreadproof.json', mimeType: 'application/json', buffer: exportBytes });
      await page.getByTestId('new-create').click();
      await page.waitForURL((url) => /^\/worksheets\/[0-9a-f-]{36}$/.test(url.pathname) && !url.pathname.endsWith(worksheetId));
      await page.locator('sp-step-card').nth(4).waitFor();
      expect(await page.getByTestId('worksheet-title').inputValue()).to.equal('BG-07 repeatability, line 3');
    });
  });

  it('edits a table as text and a note with a formula in the code editor', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: desktop }, async ({ page, screenshot }) => {
      await signIn(page);
      await createWorksheet(page, 'Text editing');
      await page.getByRole('button', { name: 'Add a Data step' }).click();
      const data = page.locator('sp-step-card').first();
      await data.getByTestId('edit-as-text').click();
      const editor = data.locator('.monaco-editor');
      await editor.waitFor({ timeout: 30_000 });
      await editor.click();
      await page.keyboard.press('Control+a');
      await page.keyboard.type('gap_um,shift\n12.1,early\n12.4,late\n11.9,early\n12.2,late\n');
      await data.getByTestId('table-preview').locator('td', { hasText: '12.4' }).waitFor();
      // Keyboard: Alt+N opens the add-step menu; the new step's heading takes the focus; Alt+K goes back.
      await page.locator('body').click({ position: { x: 5, y: 300 } });
      await page.keyboard.press('Alt+n');
      await page.locator('.add-menu button[data-kind="note"]').click();
      const note = page.locator('sp-step-card').nth(1);
      await note.waitFor();
      const focusedStep = () => page.evaluate<string>(`document.activeElement?.closest('[data-step-id]')?.getAttribute('data-step-id') ?? ''`);
      await page.waitForTimeout(300);
      expect(await focusedStep()).to.equal('note-1');
      await page.keyboard.press('Alt+k');
      await page.waitForTimeout(300);
      expect(await focusedStep()).to.equal('data-1');
      const noteEditor = note.locator('.monaco-editor');
      await noteEditor.waitFor({ timeout: 30_000 });
      await noteEditor.click();
      await page.keyboard.type('Gap readings of **line 3**; the sample variance is $s^2 = \\frac{1}{n-1}\\sum (x_i - \\bar x)^2$.');
      await previewSettled(page);
      const html = note.getByTestId('note-html');
      await html.locator('strong').waitFor({ timeout: 20_000 });
      await html.locator('.katex').first().waitFor();
      // KaTeX's stylesheet is in use: the MathML copy (for screen readers) is visually hidden.
      await page.waitForTimeout(300);
      const mathmlPosition = await page.evaluate<string>(
        `getComputedStyle(document.querySelector('[data-testid="note-html"] .katex-mathml')).position`,
      );
      expect(mathmlPosition).to.equal('absolute');
      await fontsReady(page);
      await screenshot('analyst-11-text-and-note');
    });
  });

  it('shows what changed when someone saved first, and keeps the edit as a fork', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: desktop }, async ({ page, screenshot, allowFailedResponse }) => {
      await signIn(page);
      const worksheetId = await createWorksheet(page, 'Concurrent edits');
      await page.getByRole('button', { name: 'Add a Data step' }).click();
      const data = page.locator('sp-step-card').first();
      await data.getByRole('button', { name: 'Paste from a spreadsheet' }).click();
      await data.getByTestId('paste-area').fill(`reading\n${readings.join('\n')}\n`);
      await data.getByRole('button', { name: 'Read the table' }).click();
      await previewSettled(page);

      // Meanwhile a colleague's save (through the API, same team) moves the head to revision 2.
      const session = (await (await page.request.get('/api/auth/session')).json()) as { csrfToken: string };
      const detail = (await (await page.request.get(`/api/worksheets/${worksheetId}`)).json()) as { head: { id: string; document: { title: string } } };
      const saved = await page.request.post(`/api/worksheets/${worksheetId}/revisions`, {
        headers: { 'X-CSRF-Token': session.csrfToken },
        data: { baseRevisionId: detail.head.id, document: { ...detail.head.document, title: 'Concurrent edits (renamed)' }, message: 'Renamed' },
      });
      expect(saved.status()).to.equal(201);

      allowFailedResponse(`/api/worksheets/${worksheetId}/revisions`, 409);
      await page.getByTestId('save').click();
      await page.getByTestId('save-confirm').click();
      const message = page.getByTestId('conflict-message');
      await message.waitFor({ timeout: 20_000 });
      expect(await message.textContent()).to.match(/saved revision 2/);
      await page.getByText('Title: “Concurrent edits” → “Concurrent edits (renamed)”').waitFor({ timeout: 20_000 });
      await fontsReady(page);
      await screenshot('analyst-12-conflict');
      await page.getByTestId('conflict-fork').click();
      await page.waitForURL((url) => /^\/worksheets\//.test(url.pathname) && !url.pathname.endsWith(worksheetId));
      await page.locator('.meta', { hasText: 'Forked from' }).waitFor({ timeout: 20_000 });
      // The fork holds the edit that could not be saved: the pasted table.
      await page.locator('sp-step-card').first().waitFor();
      expect(await page.locator('sp-step-card').count()).to.equal(1);
    });
  });

  it('explains bad inputs: a confidence level out of range, a file that is not a table, a broken pasted table', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: desktop }, async ({ page, screenshot, allowFailedResponse }) => {
      await signIn(page);
      await createWorksheet(page, 'Bad inputs');
      await page.getByRole('button', { name: 'Add a Data step' }).click();
      const data = page.locator('sp-step-card').first();

      // A binary file is refused by the service with its own message.
      allowFailedResponse(/\/api\/teams\/[^/]+\/datasets$/, 415);
      allowFailedResponse(/\/api\/teams\/[^/]+\/datasets$/, 422);
      await data.getByTestId('upload-input').setInputFiles({
        name: 'scan.csv',
        mimeType: 'text/csv',
        buffer: Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0x00, 0x00, 0x00, 0x0d, 0x49, 0x48, 0x44, 0x52, 0x00, 0x01]),
      });
      const uploadError = data.getByTestId('upload-error');
      await uploadError.waitFor({ timeout: 20_000 });
      expect((await uploadError.textContent())!.trim().length).to.be.greaterThan(10);

      // A pasted table with an unclosed quote: the message names the line.
      await data.getByRole('button', { name: 'Paste from a spreadsheet' }).click();
      await data.getByTestId('paste-area').fill('reading\n1.2\n"1.3\n1.4\n');
      await data.getByRole('button', { name: 'Read the table' }).click();
      await data.getByTestId('table-error').waitFor();
      expect(await data.getByTestId('table-error').textContent()).to.match(/line 3/);

      // A good paste (tab-separated, as a spreadsheet copies it).
      await data.getByTestId('paste-area').fill(`reading\n${readings.join('\n')}\n`);
      await data.getByRole('button', { name: 'Read the table' }).click();
      await data.getByTestId('table-preview').locator('td').first().waitFor();

      // A confidence level of 150 %: the field says why, and the step keeps its last good level.
      const interval = await addStep(page, 'sigma-interval');
      await previewSettled(page);
      const levels = interval.getByLabel('Confidence levels (%)');
      await levels.fill('95, 150');
      await levels.press('Tab');
      const message = interval.locator('mat-error').filter({ hasText: 'confidence level' });
      await message.waitFor();
      expect(await message.textContent()).to.contain('above 0 and below 100 %');
      // The what-if field refuses words.
      await interval.getByTestId('what-if-level').fill('ninety');
      await interval.getByTestId('what-if-level').press('Enter');
      await interval.getByTestId('what-if-error').waitFor();
      await fontsReady(page);
      await screenshot('analyst-07-bad-inputs');
    });
  });

  it('keeps an unsaved draft over a reload, asks before leaving, and flags steps when normality fails', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: desktop }, async ({ page, screenshot }) => {
      await signIn(page);
      await createWorksheet(page, 'Skewed shaft readings');
      await page.getByRole('button', { name: 'Add a Data step' }).click();
      const data = page.locator('sp-step-card').first();
      // Strongly skewed invented readings: Shapiro-Wilk rejects normality.
      const skewed = [0.1, 0.1, 0.12, 0.13, 0.11, 0.1, 0.14, 0.12, 0.1, 0.11, 0.13, 0.1, 0.12, 2.5, 3.9, 0.11, 0.1, 0.12, 6.2, 0.1];
      await data.getByRole('button', { name: 'Paste from a spreadsheet' }).click();
      await data.getByTestId('paste-area').fill(`runout\n${skewed.join('\n')}\n`);
      await data.getByRole('button', { name: 'Read the table' }).click();
      const interval = await addStep(page, 'sigma-interval');
      await addStep(page, 'normality-check');
      await previewSettled(page);
      await interval.getByTestId('normality-badge').waitFor({ timeout: 20_000 });
      await interval.getByTestId('robust-offer').waitFor();
      await fontsReady(page);
      await screenshot('analyst-08-normality-flag');

      // The draft survives a reload of the page.
      await page.reload();
      await page.getByTestId('restored').waitFor({ timeout: 20_000 });
      expect(await page.locator('sp-step-card').count()).to.equal(3);

      // Leaving with unsaved work asks first; staying keeps the editor.
      await page.getByRole('link', { name: 'Spreadproof home' }).click();
      await page.getByRole('heading', { name: 'Leave with unsaved edits?' }).waitFor();
      await page.getByRole('button', { name: 'Stay' }).click();
      expect(new URL(page.url()).pathname).to.match(/^\/worksheets\//);
      // Applying the robust alternative changes the methods to Bonett only.
      await interval.getByTestId('robust-offer').getByRole('button').click();
      await previewSettled(page);
      await interval.locator('[data-testid="formula"]').first().waitFor();
    });
  });

  it('fits a 360 px phone in the dark scheme', async () => {
    await withPage(suite.browser, { baseURL: suite.server.url, viewport: phone, colorScheme: 'dark' }, async ({ page, screenshot }) => {
      await signIn(page);
      await page.getByTestId('worksheet-table').waitFor();
      await expectNoHorizontalScroll(page, 'home');
      await fontsReady(page);
      await screenshot('analyst-09-home-phone-dark');
      await createWorksheet(page, 'Phone check');
      await page.getByRole('button', { name: 'Add a Data step' }).click();
      const data = page.locator('sp-step-card').first();
      await data.getByRole('button', { name: 'Paste from a spreadsheet' }).click();
      await data.getByTestId('paste-area').fill(`reading\n${readings.join('\n')}\n`);
      await data.getByRole('button', { name: 'Read the table' }).click();
      const interval = await addStep(page, 'sigma-interval');
      await previewSettled(page);
      await interval.locator('[data-testid="plot"] svg').first().waitFor({ timeout: 30_000 });
      await interval.locator('[data-testid="formula"] .katex').first().waitFor();
      await page.waitForTimeout(300);
      await expectNoHorizontalScroll(page, 'editor');
      await fontsReady(page);
      await screenshot('analyst-10-editor-phone-dark');
    });
  });
});
