// Determinism across processes: the same worksheet content saved through two separate server
// processes (each with its own worker threads and database) gets the same content hash and the
// same results hash, and so does an evaluation in this test process.
import { expect } from 'chai';
import supertest from 'supertest';
import { canonicalJson, sha256Hex } from '@shared/engine/hash';
import { evaluate } from '@shared/engine/evaluate';
import { WorksheetSchema } from '@shared/format/worksheet';
import { demoPassword } from '../../server/db/seed';
import { startTestServer, type TestServer } from '../support/server';
import { boreDocument } from './worksheets-support';

async function saveThrough(server: TestServer, document: object) {
  const agent = supertest.agent(server.url);
  let token = (await agent.get('/api/auth/session').expect(200)).body.csrfToken;
  await agent.post('/api/auth/signin').set('X-CSRF-Token', token).send({ email: 'tomas.lindqvist@harrowvale.test', password: demoPassword }).expect(200);
  token = (await agent.get('/api/auth/session').expect(200)).body.csrfToken;
  const teams = await agent.get('/api/teams').expect(200);
  const teamId = teams.body.teams[0].id;
  const created = await agent.post(`/api/teams/${teamId}/worksheets`).set('X-CSRF-Token', token).send({ source: 'blank', title: 'x' }).expect(201);
  const saved = await agent
    .post(`/api/worksheets/${created.body.worksheet.id}/revisions`)
    .set('X-CSRF-Token', token)
    .send({ baseRevisionId: created.body.head.id, document })
    .expect(201);
  return saved.body.revision as { contentHash: string; resultsHash: string; results: unknown };
}

describe('determinism across server processes', function () {
  this.timeout(400_000);
  let servers: TestServer[] = [];

  before(async () => {
    // Start-up loads the whole engine; on a busy machine that takes a while.
    servers = await Promise.all([startTestServer({ startTimeoutMs: 180_000 }), startTestServer({ startTimeoutMs: 180_000 })]);
  });
  after(async () => {
    await Promise.all(servers.map((s) => s.stop()));
  });

  it('gives the same content hash and results hash for the same content in two processes', async () => {
    const document = boreDocument({ title: 'Determinism check', levels: [0.9, 0.95, 0.99] });
    const [a, b] = await Promise.all(servers.map((s) => saveThrough(s, document)));
    expect(a.contentHash).to.equal(b.contentHash);
    expect(a.resultsHash).to.equal(b.resultsHash);
    expect(canonicalJson(a.results)).to.equal(canonicalJson(b.results));
    // A third process (this one) computes the same bytes.
    const local = canonicalJson(evaluate(WorksheetSchema.parse(document)));
    expect(sha256Hex(local)).to.equal(a.resultsHash);
  });
});
