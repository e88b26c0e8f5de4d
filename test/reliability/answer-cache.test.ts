/**
 * The in-memory cache of published answers (server/http/answer-cache.ts) is only a cache: a hit
 * answers exactly the bytes and headers of the answer it repeats; revoking on the same process
 * takes effect at once, revoking on another process within the time to live plus one database
 * read; after the time to live one request renews the entry while concurrent readers keep the old
 * one (no stampede); a renewal that finds the link revoked drops the entry. Clocks are faked.
 */
import { expect } from 'chai';
import { AnswerCache } from '../../server/http/answer-cache';
import { publicAnswerKey } from '../../server/publishing/routes';
import { Client } from '../server/support';
import { createBoreWorksheet, openServiceApp, teamOfRoles, type ServiceHarness } from '../server/worksheets-support';

describe('reliability: the published-answer cache', function () {
  this.timeout(120_000);
  let clock = 1_000_000;
  const now = () => clock;
  const firstCache = new AnswerCache({ ttlMs: 1000, now, key: publicAnswerKey });
  const secondCache = new AnswerCache({ ttlMs: 1000, now, key: publicAnswerKey });
  let first: ServiceHarness;
  let second: ServiceHarness;
  let token: string;
  let linkId: string;
  let owner: Client;

  before(async () => {
    first = await openServiceApp({ publishedAnswers: firstCache });
    // A second app on the same database: another server process, with a cache of its own.
    second = await openServiceApp({ publishedAnswers: secondCache });
    const team = await teamOfRoles(first, 'Cache Room');
    owner = team.clients.owner;
    const sheet = await createBoreWorksheet(team.clients.editor, team.teamId);
    const published = await owner.post(`/api/revisions/${sheet.revision.id}/links`, {}).expect(201);
    token = published.body.token;
    linkId = published.body.link.id;
  });
  after(async () => {
    await first?.close();
    await second?.close();
  });

  it('answers a hit with the same bytes and headers as the answer it keeps', async () => {
    const reader = new Client(first.app);
    const fromDatabase = await reader.get(`/api/public/${token}`).expect(200);
    const hitsBefore = firstCache.hits;
    const fromMemory = await reader.get(`/api/public/${token}`).expect(200);
    expect(firstCache.hits).to.equal(hitsBefore + 1);
    expect(fromMemory.text).to.equal(fromDatabase.text);
    for (const header of ['content-type', 'content-length', 'content-security-policy', 'x-content-type-options', 'cache-control', 'x-robots-tag', 'referrer-policy', 'x-frame-options']) {
      expect(fromMemory.headers[header], header).to.equal(fromDatabase.headers[header]);
    }
    expect(fromMemory.headers['set-cookie']).to.equal(undefined);
    expect(fromMemory.body.revision.contentHash).to.match(/^[0-9a-f]{64}$/);
  });

  it('renews an entry once after its time to live while concurrent readers keep the old one', async () => {
    const reader = new Client(second.app);
    await reader.get(`/api/public/${token}`).expect(200); // fills the second process's entry
    clock += 1500;
    const missesBefore = secondCache.misses;
    const statuses = await Promise.all(Array.from({ length: 12 }, async () => (await new Client(second.app).get(`/api/public/${token}`)).status));
    expect(statuses.every((s) => s === 200)).to.equal(true);
    expect(secondCache.misses - missesBefore, 'requests that went to the database').to.equal(1);
  });

  it('stops a revoked link at once on the process that revoked it, and after the time to live on the other', async () => {
    // Both processes hold a fresh entry.
    await new Client(first.app).get(`/api/public/${token}`).expect(200);
    await new Client(second.app).get(`/api/public/${token}`).expect(200);
    await owner.post(`/api/links/${linkId}/revoke`, {}).expect(200);
    const here = await new Client(first.app).get(`/api/public/${token}`);
    expect(here.status).to.equal(410);
    expect(here.body.error.code).to.equal('link_revoked');
    // The other process still has its entry until it is older than the time to live …
    await new Client(second.app).get(`/api/public/${token}`).expect(200);
    clock += 1001;
    // … then its renewal reads the database, answers 410 and drops the entry.
    const there = await new Client(second.app).get(`/api/public/${token}`);
    expect(there.status).to.equal(410);
    await new Client(second.app).get(`/api/public/${token}`).expect(410);
  });

  it('keeps nothing when the time to live is 0', async () => {
    const off = new AnswerCache({ ttlMs: 0, now, key: publicAnswerKey });
    const harness = await openServiceApp({ publishedAnswers: off });
    try {
      const team = await teamOfRoles(harness, 'Uncached Room');
      const sheet = await createBoreWorksheet(team.clients.editor, team.teamId);
      const published = await team.clients.owner.post(`/api/revisions/${sheet.revision.id}/links`, {}).expect(201);
      for (let i = 0; i < 3; i++) await new Client(harness.app).get(`/api/public/${published.body.token}`).expect(200);
      expect(off.hits).to.equal(0);
    } finally {
      await harness.close();
    }
  });
});
