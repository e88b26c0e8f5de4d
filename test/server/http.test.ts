import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import express from 'express';
import supertest from 'supertest';
import { createLogger } from '../../server/log';
import { errorHandler } from '../../server/http/errors';
import { Client, openTestApp, type AppUnderTest } from './support';

function parseCsp(header: string): Record<string, string[]> {
  return Object.fromEntries(
    header
      .split(';')
      .map((d) => d.trim())
      .filter(Boolean)
      .map((d) => {
        const [name, ...values] = d.split(/\s+/);
        return [name, values];
      }),
  );
}

describe('HTTP basics', function () {
  this.timeout(30_000);
  let harness: AppUnderTest;
  before(async () => {
    harness = await openTestApp();
  });
  after(() => harness?.close());

  it('GET /api/health answers { ok: true }', async () => {
    const res = await supertest(harness.app).get('/api/health').expect(200);
    expect(res.body).to.deep.equal({ ok: true });
  });

  it('answers unknown API paths with a JSON 404 in the error shape', async () => {
    const client = new Client(harness.app);
    await client.refreshToken();
    for (const res of [await client.get('/api/no-such-thing/here').expect(404), await client.post('/api/no-such-thing', {}).expect(404)]) {
      expect(res.headers['content-type']).to.match(/application\/json/);
      expect(res.body).to.have.all.keys('error');
      expect(res.body.error.code).to.equal('not_found');
      expect(res.body.error.message).to.be.a('string');
    }
  });

  it('answers malformed JSON with 400 bad_json and no stack trace', async () => {
    const client = new Client(harness.app);
    await client.refreshToken();
    const res = await client.agent
      .post('/api/auth/signin')
      .set('X-CSRF-Token', client.token)
      .set('Content-Type', 'application/json')
      .send('{"email": ')
      .expect(400);
    expect(res.body.error.code).to.equal('bad_json');
    expect(JSON.stringify(res.body)).not.to.match(/at .*\.(ts|js):\d+/);
  });

  it('refuses a body over the size limit with 413', async () => {
    const client = new Client(harness.app);
    await client.refreshToken();
    const res = await client.post('/api/auth/signup', { name: 'x'.repeat(1_100_000), email: 'big@example.test', password: 'long enough' }).expect(413);
    expect(res.body.error.code).to.equal('payload_too_large');
  });

  it('sends helmet headers and the strict Content-Security-Policy', async () => {
    const res = await supertest(harness.app).get('/api/health').expect(200);
    expect(res.headers['x-content-type-options']).to.equal('nosniff');
    expect(res.headers['x-frame-options']).to.equal('SAMEORIGIN');
    expect(res.headers['referrer-policy']).to.equal('no-referrer');
    expect(res.headers['x-powered-by']).to.equal(undefined);
    const csp = parseCsp(res.headers['content-security-policy']);
    expect(csp['default-src']).to.deep.equal(["'self'"]);
    expect(csp['script-src']).to.deep.equal(["'self'"]);
    expect(csp['script-src-attr']).to.deep.equal(["'none'"]);
    expect(csp['style-src']).to.deep.equal(["'self'", "'unsafe-inline'"]);
    expect(csp['font-src']).to.deep.equal(["'self'"]);
    expect(csp['img-src']).to.deep.equal(["'self'", 'data:']);
    expect(csp['connect-src']).to.deep.equal(["'self'"]);
    expect(csp['worker-src']).to.deep.equal(["'self'", 'blob:']);
    expect(csp['object-src']).to.deep.equal(["'none'"]);
    expect(csp['frame-ancestors']).to.deep.equal(["'none'"]);
    expect(res.headers['content-security-policy']).not.to.contain('unsafe-eval');
  });

  it('marks API answers no-store', async () => {
    const res = await supertest(harness.app).get('/api/auth/session').expect(200);
    expect(res.headers['cache-control']).to.equal('no-store');
  });

  it('turns an unexpected error into a 500 in the error shape without its message or stack', async () => {
    const app = express();
    app.get('/boom', () => {
      throw new Error('secret internal detail');
    });
    app.use(errorHandler(createLogger('silent')));
    const res = await supertest(app).get('/boom').expect(500);
    expect(res.body.error.code).to.equal('internal');
    expect(JSON.stringify(res.body)).not.to.contain('secret internal detail');
    expect(JSON.stringify(res.body)).not.to.contain('Error:');
  });

  it('serves a plain page at / when there is no client build', async () => {
    const res = await supertest(harness.app).get('/').expect(200);
    expect(res.text).to.contain('Spreadproof');
  });

  describe('with a client build', () => {
    let dir: string;
    let withClient: AppUnderTest;
    before(async () => {
      dir = mkdtempSync(path.join(os.tmpdir(), 'spreadproof-client-'));
      writeFileSync(path.join(dir, 'index.html'), '<!doctype html><title>index</title><sp-root></sp-root>');
      writeFileSync(path.join(dir, 'main-ABCDEFGH.js'), 'console.log(1);');
      withClient = await openTestApp({ clientDir: dir });
    });
    after(async () => {
      await withClient?.close();
      rmSync(dir, { recursive: true, force: true });
    });

    it('serves index.html for client routes (SPA fallback) but JSON 404 under /api', async () => {
      const page = await supertest(withClient.app).get('/teams/123').set('Accept', 'text/html').expect(200);
      expect(page.text).to.contain('<sp-root>');
      expect(page.headers['cache-control']).to.equal('no-cache');
      const root = await supertest(withClient.app).get('/').set('Accept', 'text/html').expect(200);
      expect(root.text).to.contain('<sp-root>');
      const api = await supertest(withClient.app).get('/api/teams/123/whatever').set('Accept', 'text/html').expect(404);
      expect(api.body.error.code).to.equal('not_found');
    });

    it('serves hashed bundles with a long cache lifetime', async () => {
      const res = await supertest(withClient.app).get('/main-ABCDEFGH.js').expect(200);
      expect(res.headers['cache-control']).to.contain('immutable');
    });
  });
});
