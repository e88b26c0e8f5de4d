/**
 * Shared setup of the collaboration browser suites (colleague, reviewer, owner): API sessions of
 * the demo people (supertest agents against the real test server), the worksheet the analyst
 * saved, and signing in through the app's own sign-in page.
 *
 * The worksheet analyses the NIST/SEMATECH e-Handbook GEAR.DAT gear diameters (100 values,
 * public domain), so the intervals the pages show can be checked against the handbook's printed
 * confidence limits for sigma (REFERENCES.md: 95 %: 0.00551 – 0.00729; 99 %: 0.00530 – 0.00766).
 */
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import type { Page } from 'playwright-core';
import supertest from 'supertest';
import { projectRoot } from '../../server/paths';
import type { TestServer } from '../support/server';
import { browserSuite, type BrowserSuite } from './browser-suite';

export const demoPassword = 'spreadproof-demo';
export const people = {
  analyst: 'ines.okafor@harrowvale.test',
  colleague: 'tomas.lindqvist@harrowvale.test',
  reviewer: 'priya.raman@harrowvale.test',
  viewer: 'marc.delaunay@harrowvale.test',
} as const;

/** NIST/SEMATECH e-Handbook confidence limits for sigma of GEAR.DAT (N = 100), as printed (3 significant digits). */
export const handbookSigmaLimits = {
  0.95: { lower: 0.00551, upper: 0.00729 },
  0.99: { lower: 0.0053, upper: 0.00766 },
} as const;

const gearFileCandidates = [
  path.join(projectRoot, '../shared/reference-data/nist-gear-diameter.csv'),
  path.join(projectRoot, 'test/fixtures/r/nist-gear-diameter.csv'),
];

/** GEAR.DAT as columns, or null when the reference file is not on this machine. */
export function gearData(): { diameter: number[]; batch: string[] } | null {
  const file = gearFileCandidates.find((f) => existsSync(f));
  if (!file) return null;
  const lines = readFileSync(file, 'utf8').trim().split(/\r?\n/).slice(1);
  const diameter: number[] = [];
  const batch: string[] = [];
  for (const line of lines) {
    const [d, b] = line.split(',');
    diameter.push(Number(d));
    batch.push(String(b).trim());
  }
  expect(diameter, 'GEAR.DAT has 100 values').to.have.length(100);
  return { diameter, batch };
}

export const gearSkipMessage =
  'The NIST gear-diameter reference file (../shared/reference-data/nist-gear-diameter.csv) is not on this machine.';

/** The analyst's worksheet: data, spread summary, chi-square sigma interval at `level`, target test sigma0 = 0.1. */
export function gearWorksheet(data: { diameter: number[]; batch: string[] }, level = 0.95, title = 'Gear diameter spread') {
  const source = { step: 'gears', column: 'diameter' };
  return {
    format: 'spreadproof.worksheet',
    version: 1,
    title,
    description: 'Gear diameters, NIST/SEMATECH e-Handbook GEAR.DAT (10 batches of 10).',
    steps: [
      {
        id: 'gears',
        kind: 'data',
        title: 'Gear diameters',
        params: {
          origin: 'inline',
          columns: [
            { name: 'diameter', type: 'number', unit: 'in', values: data.diameter },
            { name: 'batch', type: 'text', values: data.batch },
          ],
        },
      },
      { id: 'spread', kind: 'spread-summary', title: 'Spread of the diameters', params: { source } },
      {
        id: 'sigma',
        kind: 'sigma-interval',
        title: 'How large is sigma?',
        params: { source, levels: [level], sides: 'two-sided', methods: ['chi-square'] },
      },
      {
        id: 'target',
        kind: 'target-test',
        title: 'Is sigma 0.1 in?',
        params: { source, sigma0: 0.1, alternative: 'two-sided', alpha: Number((1 - level).toFixed(12)) },
      },
    ],
  };
}

/** A signed-in API session of one person (cookie jar + CSRF token). */
export class ApiSession {
  private readonly agent: ReturnType<typeof supertest.agent>;
  private token = '';

  constructor(baseUrl: string) {
    this.agent = supertest.agent(baseUrl);
  }

  private async refresh(): Promise<void> {
    const res = await this.agent.get('/api/auth/session').expect(200);
    this.token = res.body.csrfToken;
  }

  async signIn(email: string): Promise<{ id: string; name: string }> {
    await this.refresh();
    const res = await this.agent.post('/api/auth/signin').set('X-CSRF-Token', this.token).send({ email, password: demoPassword });
    expect(res.status, `sign-in of ${email}: ${JSON.stringify(res.body)}`).to.equal(200);
    await this.refresh();
    return res.body.user;
  }

  async get<T = any>(url: string, status = 200): Promise<T> {
    const res = await this.agent.get(url);
    expect(res.status, `GET ${url}: ${JSON.stringify(res.body)}`).to.equal(status);
    return res.body as T;
  }

  async post<T = any>(url: string, body: object, status = 201): Promise<T> {
    const res = await this.agent.post(url).set('X-CSRF-Token', this.token).send(body);
    expect(res.status, `POST ${url}: ${JSON.stringify(res.body).slice(0, 500)}`).to.equal(status);
    return res.body as T;
  }

  async teamId(name = 'Metrology Lab'): Promise<string> {
    const { teams } = await this.get<{ teams: { id: string; name: string }[] }>('/api/teams');
    const team = teams.find((t) => t.name === name);
    expect(team, `team ${name}`).to.not.equal(undefined);
    return team!.id;
  }
}

export interface AnalystWorksheet {
  teamId: string;
  worksheetId: string;
  /** The analyst's saved revision (number 2; number 1 is the blank start). */
  revisionId: string;
  revisionNumber: number;
  contentHash: string;
}

/** Ines (the analyst) creates the gear worksheet and saves the analysis as its second revision. */
export async function analystSavesGearWorksheet(baseUrl: string, data: { diameter: number[]; batch: string[] }): Promise<AnalystWorksheet> {
  const ines = new ApiSession(baseUrl);
  await ines.signIn(people.analyst);
  const teamId = await ines.teamId();
  const created = await ines.post<any>(`/api/teams/${teamId}/worksheets`, { source: 'blank', title: 'Gear diameter spread' });
  const saved = await ines.post<any>(`/api/worksheets/${created.worksheet.id}/revisions`, {
    baseRevisionId: created.head.id,
    document: gearWorksheet(data),
    message: 'Gear diameters, spread and sigma interval at 95 %',
  });
  return {
    teamId,
    worksheetId: created.worksheet.id,
    revisionId: saved.revision.id,
    revisionNumber: saved.revision.number,
    contentHash: saved.revision.contentHash,
  };
}

/** Signs in through the app's sign-in page; lands on `returnTo` when given. */
export async function signInThroughPage(page: Page, email: string, returnTo?: string): Promise<void> {
  await page.goto(returnTo ? `/sign-in?returnUrl=${encodeURIComponent(returnTo)}` : '/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(demoPassword);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'), { timeout: 15_000 });
}

/** A number as the page shows it (engine display strings such as "0.005513"). */
export function shownNumber(text: string | null): number {
  const value = Number((text ?? '').trim().replace(/[^\d.eE+-]/g, ''));
  expect(Number.isFinite(value), `a number on the page, got "${text}"`).to.equal(true);
  return value;
}

/** The sigma interval (chi-square) a read-only sheet shows for the step with id `stepId`. */
export async function shownSigmaInterval(page: Page, stepId = 'sigma'): Promise<{ lower: number; upper: number }> {
  const step = page.locator(`[data-testid="sheet"] li[data-step-id="${stepId}"]`);
  const lower = await step.locator('[data-value-id="chisq.sdLower"] .num').first().textContent();
  const upper = await step.locator('[data-value-id="chisq.sdUpper"] .num').first().textContent();
  return { lower: shownNumber(lower), upper: shownNumber(upper) };
}

/** True when `shown` rounds to the handbook's printed 3-significant-digit value. */
export function matchesPrinted(shown: number, printed: number): boolean {
  return Number(shown.toPrecision(3)) === printed;
}

/**
 * The set-up of the collaboration suites: skipped (and saying why) without the GEAR.DAT reference
 * file; otherwise a test server on which the analyst has saved the gear worksheet, then `prepare`
 * (more data through the API, if any), then Chromium. Call it inside `describe`.
 */
export function gearBrowserSuite(
  prepare?: (server: TestServer, sheet: AnalystWorksheet, data: { diameter: number[]; batch: string[] }) => Promise<void>,
): BrowserSuite & { readonly sheet: AnalystWorksheet } {
  let data: { diameter: number[]; batch: string[] } | null = null;
  let sheet: AnalystWorksheet | undefined;
  const suite = browserSuite({
    skipReason: () => {
      data = gearData();
      return data ? undefined : gearSkipMessage;
    },
    prepare: async (server) => {
      sheet = await analystSavesGearWorksheet(server.url, data!);
      await prepare?.(server, sheet, data!);
    },
  });
  return {
    get server() {
      return suite.server;
    },
    get browser() {
      return suite.browser;
    },
    get sheet() {
      if (!sheet) throw new Error('The analyst has not saved the gear worksheet yet (gearBrowserSuite before hook).');
      return sheet;
    },
  };
}
