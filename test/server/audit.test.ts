// The audit trail (every state-changing route writes an event; owners list them) and the
// immutability of revisions, verdicts and audit events, proved with raw SQL through pg.
import { expect } from 'chai';
import pg from 'pg';
import { suiteDatabaseUrl } from '../support/db';
import { Client } from './support';
import { boreDocument, createBoreWorksheet, expectError, openServiceApp, teamOfRoles, type ServiceHarness, type TeamOfRoles } from './worksheets-support';

describe('audit trail', function () {
  this.timeout(180_000);
  let h: ServiceHarness;
  let t: TeamOfRoles;

  before(async () => {
    h = await openServiceApp();
    t = await teamOfRoles(h, 'Audit Suite');
  });
  after(() => h?.close());

  it('records every state-changing action of the worksheet service, newest first, for owners', async () => {
    const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
    const upload = await t.clients.editor.agent
      .post(`/api/teams/${t.teamId}/datasets`)
      .set('X-CSRF-Token', t.clients.editor.token)
      .attach('file', Buffer.from('x\n1.1\n1.3\n1.2\n'), 'audit.csv')
      .expect(201);
    const request = await t.clients.editor.post(`/api/revisions/${revision.id}/review-requests`, { reviewerId: t.users.reviewer.id }).expect(201);
    const review = await t.clients.reviewer.post(`/api/revisions/${revision.id}/reviews`, { verdict: 'approved' }).expect(201);
    const link = await t.clients.owner.post(`/api/revisions/${revision.id}/links`).expect(201);
    await t.clients.owner.post(`/api/links/${link.body.link.id}/revoke`).expect(200);
    const fork = await t.clients.editor.post(`/api/revisions/${revision.id}/fork`, { teamId: t.teamId, document: boreDocument({ levels: [0.99] }) }).expect(201);
    await t.clients.owner.post(`/api/worksheets/${worksheetId}/archive`).expect(200);
    await t.clients.owner.post(`/api/worksheets/${worksheetId}/restore`).expect(200);
    const imported = await t.clients.editor.post(`/api/teams/${t.teamId}/worksheets/import`, boreDocument({ title: 'Imported for audit' })).expect(201);

    const res = await t.clients.owner.get(`/api/teams/${t.teamId}/audit?pageSize=200`).expect(200);
    const trail = res.body.items.map((e: { action: string; objectId: string }) => `${e.action} ${e.objectId}`);
    expect(trail.slice(0, 11)).to.deep.equal([
      `worksheet.import ${imported.body.worksheet.id}`,
      `worksheet.restore ${worksheetId}`,
      `worksheet.archive ${worksheetId}`,
      `worksheet.fork ${fork.body.worksheet.id}`,
      `link.revoke ${link.body.link.id}`,
      `link.publish ${link.body.link.id}`,
      `review.verdict ${review.body.review.id}`,
      `review.request ${request.body.request.id}`,
      `dataset.upload ${upload.body.dataset.id}`,
      `revision.save ${revision.id}`,
      `worksheet.create ${worksheetId}`,
    ]);
    const save = res.body.items.find((e: { action: string }) => e.action === 'revision.save');
    expect(save.actor).to.deep.equal({ id: t.users.editor.id, name: t.users.editor.name });
    expect(save.details).to.include({ contentHash: revision.contentHash, resultsHash: revision.resultsHash, number: 2 });
    expect(save.worksheetId).to.equal(worksheetId);

    const onlySaves = await t.clients.owner.get(`/api/teams/${t.teamId}/audit?action=revision.save`).expect(200);
    expect(onlySaves.body.items.every((e: { action: string }) => e.action === 'revision.save')).to.equal(true);
    expect(onlySaves.body.total).to.equal(1);

    for (const role of ['editor', 'reviewer', 'viewer'] as const) {
      expectError((await t.clients[role].get(`/api/teams/${t.teamId}/audit`).expect(403)).body, 'forbidden');
    }
    await t.clients.outsider.get(`/api/teams/${t.teamId}/audit`).expect(404);
    await new Client(h.app).get(`/api/teams/${t.teamId}/audit`).expect(401);
  });
});

describe('immutable records in the database', function () {
  this.timeout(180_000);
  let h: ServiceHarness;
  let raw: pg.Client;
  let ids: { revision: string; review: string; worksheet: string };

  before(async () => {
    h = await openServiceApp();
    const t = await teamOfRoles(h, 'Immutable Suite');
    const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
    const review = await t.clients.reviewer.post(`/api/revisions/${revision.id}/reviews`, { verdict: 'approved' }).expect(201);
    ids = { revision: revision.id, review: review.body.review.id, worksheet: worksheetId };
    raw = new pg.Client({ connectionString: await suiteDatabaseUrl() });
    await raw.connect();
  });
  after(async () => {
    await raw?.end();
    await h?.close();
  });

  async function refused(sql: string, params: unknown[] = []): Promise<string> {
    try {
      await raw.query(sql, params);
    } catch (error) {
      return (error as Error).message;
    }
    throw new Error(`expected the database to refuse: ${sql}`);
  }

  const statements: [string, string, (ids: { revision: string; review: string; worksheet: string }) => unknown[]][] = [
    ['UPDATE revisions', "update revisions set results = '{}' where id = $1", (i) => [i.revision]],
    ['UPDATE revisions (message only)', "update revisions set message = 'rewritten' where id = $1", (i) => [i.revision]],
    ['DELETE revisions', 'delete from revisions where id = $1', (i) => [i.revision]],
    ['TRUNCATE revisions', 'truncate revisions cascade', () => []],
    ['UPDATE reviews', "update reviews set verdict = 'changes_requested' where id = $1", (i) => [i.review]],
    ['DELETE reviews', 'delete from reviews where id = $1', (i) => [i.review]],
    ['UPDATE audit_events', "update audit_events set action = 'nothing' where worksheet_id = $1", (i) => [i.worksheet]],
    ['DELETE audit_events', 'delete from audit_events where worksheet_id = $1', (i) => [i.worksheet]],
    ['TRUNCATE audit_events', 'truncate audit_events', () => []],
  ];

  for (const [label, sql, params] of statements) {
    it(`refuses ${label}`, async () => {
      const message = await refused(sql, params(ids));
      expect(message).to.match(/immutable records/);
    });
  }

  it('keeps the rows unchanged after the refused statements', async () => {
    const rev = await raw.query('select message from revisions where id = $1', [ids.revision]);
    expect(rev.rows).to.deep.equal([{ message: 'Measurements and interval' }]);
    const review = await raw.query('select verdict from reviews where id = $1', [ids.review]);
    expect(review.rows).to.deep.equal([{ verdict: 'approved' }]);
    const events = await raw.query('select count(*)::int as n from audit_events where worksheet_id = $1', [ids.worksheet]);
    expect(events.rows[0].n).to.be.greaterThan(0);
  });

  it('refuses changing the bytes of a content-addressed dataset', async () => {
    const id = 'c'.repeat(64);
    await raw.query("insert into datasets (id, media_type, byte_size, bytes, parsed) values ($1, 'text/csv', 3, $2, '{}') on conflict do nothing", [id, Buffer.from('x\n1')]);
    const message = await refused('update datasets set bytes = $2 where id = $1', [id, Buffer.from('x\n2')]);
    expect(message).to.match(/bytes and id cannot change/);
  });
});
