/**
 * In-process helpers for the API suites: the app from `createApp()` on the run's database, and
 * supertest agents that carry a session cookie and the session's CSRF token.
 */
import { randomBytes } from 'node:crypto';
import { expect } from 'chai';
import type express from 'express';
import supertest from 'supertest';
import { createApp, type AppDeps } from '../../server/app';
import { openDatabase, type DatabaseHandle } from '../../server/db/client';
import { suiteDatabaseUrl } from '../support/db';

export interface AppUnderTest {
  app: express.Express;
  database: DatabaseHandle;
  close(): Promise<void>;
}

export async function openTestApp(overrides: Partial<AppDeps> = {}): Promise<AppUnderTest> {
  const database = openDatabase(await suiteDatabaseUrl(), { max: 5 });
  const app = createApp({
    db: database.db,
    pool: database.pool,
    sessionSecret: randomBytes(24).toString('base64url'),
    authRateLimit: { windowMs: 60_000, limit: 1000 },
    ...overrides,
  });
  return { app, database, close: () => database.close() };
}

export const uniqueEmail = (label = 'person') => `${label}.${randomBytes(5).toString('hex')}@example.test`;
export const testPassword = 'correct horse battery';

/** A cookie-keeping client; `token` is the current session's CSRF token (refresh after sign-in/out). */
export class Client {
  readonly agent: ReturnType<typeof supertest.agent>;
  token = '';

  constructor(app: express.Express) {
    this.agent = supertest.agent(app);
  }

  async refreshToken(): Promise<string> {
    const res = await this.agent.get('/api/auth/session').expect(200);
    this.token = res.body.csrfToken;
    expect(this.token).to.be.a('string').with.length.greaterThan(20);
    return this.token;
  }

  get(path: string) {
    return this.agent.get(path);
  }
  post(path: string, body?: object) {
    return this.agent.post(path).set('X-CSRF-Token', this.token).send(body ?? {});
  }
  patch(path: string, body?: object) {
    return this.agent.patch(path).set('X-CSRF-Token', this.token).send(body ?? {});
  }
  delete(path: string) {
    return this.agent.delete(path).set('X-CSRF-Token', this.token);
  }

  async signUp(person: { name?: string; email?: string; password?: string } = {}) {
    await this.refreshToken();
    const body = { name: person.name ?? 'Test Person', email: person.email ?? uniqueEmail(), password: person.password ?? testPassword };
    const res = await this.post('/api/auth/signup', body).expect(201);
    await this.refreshToken();
    return { ...res.body.user, password: body.password } as { id: string; name: string; email: string; password: string };
  }

  async signIn(email: string, password = testPassword) {
    await this.refreshToken();
    const res = await this.post('/api/auth/signin', { email, password }).expect(200);
    await this.refreshToken();
    return res.body.user as { id: string; name: string; email: string };
  }
}

/** Fails if any response body anywhere mentions a password hash. */
export function expectNoSecrets(body: unknown): void {
  const text = JSON.stringify(body ?? null);
  expect(text).not.to.match(/scrypt\$/);
  expect(text).not.to.match(/password_?hash/i);
}
