/**
 * Scale-out: two server processes on one database, as behind a load balancer, with requests
 * alternating between them. Nothing that matters may live in one process: sessions and CSRF
 * tokens (PostgreSQL session store), worksheets, revisions and datasets (tables), rate-limit
 * counters (rate_limit_counters); the results caches and the published-answer cache are per
 * process but only caches (a revocation reaches the other process within the cache's time to
 * live), and both processes compute byte-identical results.
 */
import { randomBytes } from 'node:crypto';
import { expect } from 'chai';
import { datasetDocument, twentyStepDocument } from '../../bench/support/documents';
import { demoOwner, SessionClient } from '../../bench/support/session-client';
import { startTestServer, type TestServer } from '../support/server';
import { eventually, hashesOfAnswer } from './support';

describe('reliability: two server processes on one database', function () {
  this.timeout(240_000);
  const secret = randomBytes(24).toString('base64url');
  const failedSignInLimit = 6;
  /** Failed published-link look-ups from this address so far (the guess limiter counts them). */
  let publicFailures = 0;
  let a: TestServer | undefined;
  let b: TestServer | undefined;

  before(async () => {
    const env = { SESSION_SECRET: secret, EVAL_THREADS: '1' };
    a = await startTestServer({ env, authRateLimit: failedSignInLimit });
    b = await startTestServer({ databaseUrl: a.databaseUrl, env, authRateLimit: failedSignInLimit });
  });
  after(async () => {
    await b?.stop();
    await a?.stop();
  });

  it('signs in on one process, saves on the other, and reads the same revision on both', async () => {
    const onA = new SessionClient(a!.url);
    await onA.signIn(demoOwner.email, demoOwner.password);
    const onB = onA.withSessionOn(b!.url);
    // The session, and its CSRF token, are the same on the other process.
    const session = await onB.get('/api/auth/session');
    expect(session.body.user.email).to.equal(demoOwner.email);
    expect(session.body.csrfToken).to.equal(onA.token);

    const teamId = (await onB.get('/api/teams')).body.teams[0].id;
    const created = SessionClient.expect(await onB.post(`/api/teams/${teamId}/worksheets`, { source: 'blank', title: 'Two-process study' }), 201, 'create on B');
    const worksheetId = created.body.worksheet.id;
    let base = created.body.head.id;
    const saved: string[] = [];
    // Alternate saves: A, B, A, B — each based on the head the other process wrote.
    for (let i = 0; i < 4; i++) {
      const client = i % 2 === 0 ? onA : onB;
      const res = SessionClient.expect(
        await client.post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: base, document: twentyStepDocument(500 + i, 'Two-process study'), message: `save ${i}` }),
        201,
        `save ${i}`,
      );
      base = res.body.revision.id;
      saved.push(base);
    }
    // A save based on an old head is refused by either process.
    const stale = await onA.post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: saved[1], document: twentyStepDocument(1, 'Two-process study') });
    expect(stale.status).to.equal(409);
    expect(stale.body.error.details.head.id).to.equal(base);

    for (const id of saved) {
      const fromA = SessionClient.expect(await onA.get(`/api/revisions/${id}`), 200, `read ${id} on A`).body.revision;
      const fromB = SessionClient.expect(await onB.get(`/api/revisions/${id}`), 200, `read ${id} on B`).body.revision;
      expect(fromB).to.deep.equal(fromA);
      expect(hashesOfAnswer(fromA)).to.deep.equal({ contentHash: fromA.contentHash, resultsHash: fromA.resultsHash });
    }
    const timelineA = (await onA.get(`/api/worksheets/${worksheetId}/revisions`)).body;
    const timelineB = (await onB.get(`/api/worksheets/${worksheetId}/revisions`)).body;
    expect(timelineA.items.map((r: { id: string }) => r.id)).to.deep.equal(timelineB.items.map((r: { id: string }) => r.id));
    expect(timelineA.total).to.equal(5);

    // The same draft evaluated by each process (each with its own cache) gives the same results.
    const draft = { document: twentyStepDocument(777, 'Draft on both') };
    const evalA = SessionClient.expect(await onA.post(`/api/worksheets/${worksheetId}/evaluate`, draft), 200, 'evaluate on A').body;
    const evalB = SessionClient.expect(await onB.post(`/api/worksheets/${worksheetId}/evaluate`, draft), 200, 'evaluate on B').body;
    expect(evalB.resultsHash).to.equal(evalA.resultsHash);
    expect(evalB.contentHash).to.equal(evalA.contentHash);

    // A dataset uploaded through A is used by a save through B.
    const form = new FormData();
    form.append('file', new Blob(['gauge,deviation\nG1,2.1\nG2,1.8\nG3,2.4\nG4,2.0\nG5,1.7\nG6,2.2\n'], { type: 'text/csv' }), 'gauges.csv');
    const upload = SessionClient.expect(await onA.request('POST', `/api/teams/${teamId}/datasets`, undefined, { raw: form }), 201, 'upload on A');
    const withData = SessionClient.expect(
      await onB.post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: base, document: datasetDocument(upload.body.dataset.id, 'deviation', 3) }),
      201,
      'save using the dataset on B',
    );
    // The dataset was found and read by B: every step evaluated without an error.
    expect(withData.body.revision.results.counts).to.deep.equal({ ok: 3, error: 0 });

    // A link published through A is read on both; revoked through B, it stops on B at once and on
    // A once A's in-memory copy is older than PUBLIC_LINK_CACHE_MS (1 s) — well within 5 s.
    const link = SessionClient.expect(await onA.post(`/api/revisions/${base}/links`, {}), 201, 'publish on A').body;
    const reader = async (url: string) => {
      const res = await new SessionClient(url).get(`/api/public/${link.token}`);
      if (res.status >= 400) publicFailures += 1; // counted by the guess limiter, like a guess
      return res;
    };
    expect((await reader(a!.url)).status).to.equal(200);
    expect((await reader(b!.url)).status).to.equal(200);
    SessionClient.expect(await onB.post(`/api/links/${link.link.id}/revoke`, {}), 200, 'revoke on B');
    expect((await reader(b!.url)).status).to.equal(410);
    const revokedAt = Date.now();
    await eventually(async () => (await reader(a!.url)).status === 410, 5_000, 'the revoked link answering 410 on A');
    expect(Date.now() - revokedAt).to.be.lessThan(5_000);

    // Signing out on B ends the session on A too.
    SessionClient.expect(await onB.post('/api/auth/signout'), 204, 'sign out on B');
    expect((await onA.get('/api/auth/session')).body.user).to.equal(null);
  });

  it('counts failed sign-ins and guessed link tokens across both processes', async () => {
    const servers = [a!, b!];
    const statuses: number[] = [];
    for (let i = 0; i < failedSignInLimit + 2; i++) {
      const client = new SessionClient(servers[i % 2].url);
      await client.refreshToken();
      statuses.push((await client.post('/api/auth/signin', { email: demoOwner.email, password: `not the password ${i}` })).status);
    }
    // Per process, each would have seen only half of the failures and kept answering 401.
    expect(statuses).to.deep.equal([...Array(failedSignInLimit).fill(401), 429, 429]);

    // Published links: the default limit is 60 failed look-ups per 15 minutes and address.
    const guesses: number[] = [];
    for (let i = 0; i < 62; i++) {
      const client = new SessionClient(servers[i % 2].url);
      guesses.push((await client.get(`/api/public/${randomBytes(32).toString('base64url')}`)).status);
    }
    const allowed = 60 - publicFailures;
    expect(guesses.slice(0, allowed).every((s) => s === 404), JSON.stringify(guesses)).to.equal(true);
    expect(guesses.slice(allowed)).to.deep.equal(Array(62 - allowed).fill(429));
  });
});
