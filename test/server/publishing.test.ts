// Published links: owners publish one revision, the token is shown once and only its hash is
// stored; the public route serves exactly that revision and nothing else; revoked → 410,
// unknown → 404; guessing is rate-limited.
import { expect } from 'chai';
import supertest from 'supertest';
import { eq } from 'drizzle-orm';
import { sha256Hex } from '@shared/engine/hash';
import { publishedLinks } from '../../schema/index';
import { Client } from './support';
import { boreDocument, createBoreWorksheet, expectError, openServiceApp, teamOfRoles, type ServiceHarness, type TeamOfRoles } from './worksheets-support';

describe('published links', function () {
  this.timeout(180_000);
  let h: ServiceHarness;
  let t: TeamOfRoles;

  before(async () => {
    h = await openServiceApp({ publicRateLimit: { windowMs: 60_000, failures: 1000 } });
    t = await teamOfRoles(h, 'Publishing Suite');
  });
  after(() => h?.close());

  it('publishes a revision with a 256-bit token shown once; only its hash is stored', async () => {
    const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
    await t.clients.editor.post(`/api/revisions/${revision.id}/links`).expect(403);
    const res = await t.clients.owner.post(`/api/revisions/${revision.id}/links`).expect(201);
    const { token, url, link } = res.body;
    expect(token).to.match(/^[A-Za-z0-9_-]{43}$/); // 32 random bytes in base64url
    expect(Buffer.from(token, 'base64url')).to.have.length(32);
    expect(url).to.equal(`/p/${token}`);
    expect(link).to.include({ revisionId: revision.id, revisionNumber: 2, revokedAt: null });
    const [row] = await h.database.db.select().from(publishedLinks).where(eq(publishedLinks.id, link.id));
    expect(row.tokenHash).to.equal(sha256Hex(token));
    expect(JSON.stringify(row)).to.not.contain(token);
    const listed = await t.clients.owner.get(`/api/worksheets/${worksheetId}/links`).expect(200);
    expect(listed.body.items.map((l: { id: string }) => l.id)).to.deep.equal([link.id]);
    expect(JSON.stringify(listed.body)).to.not.contain(token);
    // The history marks the revision as published.
    const timeline = await t.clients.viewer.get(`/api/worksheets/${worksheetId}/revisions`).expect(200);
    expect(timeline.body.items.map((r: { published: boolean }) => r.published)).to.deep.equal([true, false]);
    const ws = await t.clients.viewer.get(`/api/worksheets/${worksheetId}`).expect(200);
    expect(ws.body.worksheet.published).to.equal(true);
  });

  it('serves exactly the published revision, without sign-in, and exposes nothing else', async () => {
    const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
    const { body } = await t.clients.owner.post(`/api/revisions/${revision.id}/links`).expect(201);
    // Later revisions do not change what the link shows.
    await t.clients.editor
      .post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: revision.id, document: boreDocument({ title: 'Renamed later', levels: [0.99] }) })
      .expect(201);

    const anonymous = supertest(h.app);
    const res = await anonymous.get(`/api/public/${body.token}`).expect(200);
    expect(res.headers['cache-control']).to.equal('no-store');
    expect(res.headers['x-robots-tag']).to.contain('noindex');
    expect(Object.keys(res.body).sort()).to.deep.equal(['revision', 'title']);
    expect(Object.keys(res.body.revision).sort()).to.deep.equal(['contentHash', 'createdAt', 'document', 'engineVersion', 'number', 'results', 'resultsHash']);
    expect(res.body.title).to.equal('Bore gauge repeatability');
    expect(res.body.revision).to.include({ number: 2, contentHash: revision.contentHash, resultsHash: revision.resultsHash, createdAt: revision.createdAt });
    expect(res.body.revision.document).to.deep.equal(revision.document);
    expect(res.body.revision.results).to.deep.equal(revision.results);
    const text = JSON.stringify(res.body);
    for (const secret of [worksheetId, revision.id, t.teamId, t.users.editor.id, t.users.editor.email, t.users.editor.name, body.link.id]) {
      expect(text, `the public answer mentions ${secret}`).to.not.contain(secret);
    }
    // The token opens nothing but this route.
    await anonymous.get(`/api/worksheets/${worksheetId}`).expect(401);
    await anonymous.get(`/api/revisions/${revision.id}`).expect(401);
  });

  it('answers 410 after revoking, 404 for unknown or malformed tokens', async () => {
    const { revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
    const { body } = await t.clients.owner.post(`/api/revisions/${revision.id}/links`).expect(201);
    const anonymous = supertest(h.app);
    await anonymous.get(`/api/public/${body.token}`).expect(200);
    await t.clients.editor.post(`/api/links/${body.link.id}/revoke`).expect(403);
    const revoked = await t.clients.owner.post(`/api/links/${body.link.id}/revoke`).expect(200);
    expect(revoked.body.link.revokedAt).to.be.a('string');
    const again = await t.clients.owner.post(`/api/links/${body.link.id}/revoke`).expect(200);
    expect(again.body.link.revokedAt).to.equal(revoked.body.link.revokedAt);
    const gone = await anonymous.get(`/api/public/${body.token}`).expect(410);
    expectError(gone.body, 'link_revoked');
    const guessed = body.token.slice(0, -1) + (body.token.endsWith('A') ? 'B' : 'A');
    expectError((await anonymous.get(`/api/public/${guessed}`).expect(404)).body, 'not_found');
    expectError((await anonymous.get('/api/public/short').expect(404)).body, 'not_found');
    expectError((await anonymous.get(`/api/public/${'x'.repeat(300)}`).expect(404)).body, 'not_found');
    // The revision is no longer marked as published.
    const one = await t.clients.viewer.get(`/api/revisions/${revision.id}`).expect(200);
    expect(one.body.revision.published).to.equal(false);
  });

  it('keeps the links of another team out of reach', async () => {
    const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
    const { body } = await t.clients.owner.post(`/api/revisions/${revision.id}/links`).expect(201);
    const other = await teamOfRoles(h, 'Publishing Other');
    await other.clients.owner.post(`/api/links/${body.link.id}/revoke`).expect(404);
    await other.clients.owner.get(`/api/worksheets/${worksheetId}/links`).expect(404);
    await other.clients.owner.post(`/api/revisions/${revision.id}/links`).expect(404);
  });

  it('rate-limits guessing of tokens; reading a valid link does not count against the limit', async () => {
    const limited = await openServiceApp({ publicRateLimit: { windowMs: 60_000, failures: 3 } });
    try {
      const team = await teamOfRoles(limited, 'Rate Suite');
      const { revision } = await createBoreWorksheet(team.clients.editor, team.teamId);
      const { body } = await team.clients.owner.post(`/api/revisions/${revision.id}/links`).expect(201);
      const anonymous = new Client(limited.app);
      for (let i = 0; i < 10; i++) await anonymous.get(`/api/public/${body.token}`).expect(200);
      const wrong = 'A'.repeat(43);
      for (let i = 0; i < 3; i++) await anonymous.get(`/api/public/${wrong}`).expect(404);
      const res = await anonymous.get(`/api/public/${wrong}`).expect(429);
      expectError(res.body, 'rate_limited');
    } finally {
      await limited.close();
    }
  });
});
