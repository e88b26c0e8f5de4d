/**
 * Helpers for the worksheet-service API suites: an app with its own evaluator, a team with one
 * member of each role, and worksheet documents. The measurement values are invented demo data.
 */
import { expect } from 'chai';
import type { WorksheetInput } from '@shared/format/worksheet';
import { randomBytes } from 'node:crypto';
import { createApp, type AppDeps } from '../../server/app';
import { openDatabase } from '../../server/db/client';
import { Evaluator, type EvaluatorOptions } from '../../server/evaluation/evaluator';
import { suiteDatabaseUrl } from '../support/db';
import { Client, type AppUnderTest } from './support';

export interface ServiceHarness extends AppUnderTest {
  evaluator: Evaluator;
}

/** createApp() on the database at `url` with an evaluator of its own (both closed with the harness). */
export function openAppWithEvaluator(
  url: string,
  options: { overrides?: Partial<AppDeps>; evaluatorOptions?: EvaluatorOptions; poolSize?: number } = {},
): ServiceHarness {
  const database = openDatabase(url, { max: options.poolSize ?? 10 });
  const evaluator = new Evaluator(database.db, { maxThreads: 2, ...options.evaluatorOptions });
  const app = createApp({
    db: database.db,
    pool: database.pool,
    sessionSecret: randomBytes(24).toString('base64url'),
    authRateLimit: { windowMs: 60_000, limit: 1000 },
    evaluator,
    ...options.overrides,
  });
  return {
    app,
    database,
    evaluator,
    close: async () => {
      await evaluator.close();
      await database.close();
    },
  };
}

/** The app on the run's database with an evaluator of its own (closed with the harness). */
export async function openServiceApp(
  overrides: Partial<AppDeps> = {},
  evaluatorOptions: EvaluatorOptions = {},
): Promise<ServiceHarness> {
  return openAppWithEvaluator(await suiteDatabaseUrl(), { overrides, evaluatorOptions });
}

export type RoleName = 'owner' | 'editor' | 'reviewer' | 'viewer' | 'outsider';

export interface TeamOfRoles {
  teamId: string;
  clients: Record<RoleName, Client>;
  users: Record<RoleName, { id: string; name: string; email: string }>;
}

/** A fresh team whose owner adds an editor, a reviewer and a viewer; plus a signed-in outsider. */
export async function teamOfRoles(harness: AppUnderTest, teamName = 'Gauge Room'): Promise<TeamOfRoles> {
  const roles: RoleName[] = ['owner', 'editor', 'reviewer', 'viewer', 'outsider'];
  const clients = {} as Record<RoleName, Client>;
  const users = {} as TeamOfRoles['users'];
  for (const role of roles) {
    clients[role] = new Client(harness.app);
    const u = await clients[role].signUp({ name: `${role[0].toUpperCase()}${role.slice(1)} Person` });
    users[role] = { id: u.id, name: u.name, email: u.email };
  }
  const created = await clients.owner.post('/api/teams', { name: teamName }).expect(201);
  const teamId = created.body.team.id as string;
  for (const role of ['editor', 'reviewer', 'viewer'] as const) {
    await clients.owner.post(`/api/teams/${teamId}/members`, { email: users[role].email, role }).expect(201);
  }
  return { teamId, clients, users };
}

/** Bore diameters of a ring gauge measured repeatedly (invented demo values, um deviation from nominal). */
export const boreValues = [2.1, 1.8, 2.4, 2.0, 1.7, 2.3, 2.2, 1.9, 2.5, 2.0, 1.6, 2.2, 2.1, 1.9, 2.3];

export function boreDocument(options: { title?: string; levels?: number[]; values?: number[]; sigma0?: number } = {}): WorksheetInput {
  return {
    format: 'spreadproof.worksheet',
    version: 1,
    title: options.title ?? 'Bore gauge repeatability',
    steps: [
      {
        id: 'bores',
        kind: 'data',
        title: 'Repeated bore measurements',
        params: { origin: 'inline', columns: [{ name: 'deviation', type: 'number', unit: 'um', values: options.values ?? boreValues }] },
      },
      { id: 'spread', kind: 'spread-summary', params: { source: { step: 'bores', column: 'deviation' } } },
      {
        id: 'sigma',
        kind: 'sigma-interval',
        title: 'Repeatability sigma',
        params: { source: { step: 'bores', column: 'deviation' }, levels: options.levels ?? [0.95], sides: 'upper' },
      },
      {
        id: 'target',
        kind: 'target-test',
        params: { source: { step: 'bores', column: 'deviation' }, sigma0: options.sigma0 ?? 0.5, alternative: 'less', alpha: 0.05 },
      },
    ],
  };
}

export async function createBoreWorksheet(client: Client, teamId: string, document: WorksheetInput = boreDocument()) {
  const blank = await client.post(`/api/teams/${teamId}/worksheets`, { source: 'blank', title: document.title }).expect(201);
  const saved = await client
    .post(`/api/worksheets/${blank.body.worksheet.id}/revisions`, { baseRevisionId: blank.body.head.id, document, message: 'Measurements and interval' })
    .expect(201);
  return { worksheetId: blank.body.worksheet.id as string, first: blank.body.head.id as string, revision: saved.body.revision };
}

export function expectError(body: unknown, code: string): void {
  expect(body, JSON.stringify(body)).to.have.nested.property('error.code', code);
  expect((body as { error: { message: string } }).error.message).to.be.a('string').that.is.not.empty;
}
