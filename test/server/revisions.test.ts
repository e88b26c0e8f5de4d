// Revisions API: save with the moved-head check (and two concurrent saves from one base), draft
// evaluation, timeline, one revision, re-check against the current engine, fork.
import { expect } from 'chai';
import { eq } from 'drizzle-orm';
import { canonicalJson, sha256Hex } from '@shared/engine/hash';
import { revisions, worksheets } from '../../schema/index';
import { boreDocument, createBoreWorksheet, expectError, openServiceApp, teamOfRoles, type ServiceHarness, type TeamOfRoles } from './worksheets-support';

describe('revisions API', function () {
  this.timeout(180_000);
  let h: ServiceHarness;
  let t: TeamOfRoles;

  before(async () => {
    h = await openServiceApp();
    t = await teamOfRoles(h, 'Revision Suite');
  });
  after(() => h?.close());

  describe('save', () => {
    it('stores a new revision with its results and moves the head', async () => {
      const { worksheetId, first, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
      expect(revision).to.include({ number: 2, parentId: first, message: 'Measurements and interval' });
      expect(revision.author).to.deep.equal({ id: t.users.editor.id, name: t.users.editor.name });
      expect(revision.contentHash).to.equal(sha256Hex(canonicalJson(revision.document)));
      expect(revision.resultsHash).to.equal(sha256Hex(canonicalJson(revision.results)));
      expect(revision.results.worksheetHash).to.equal(revision.contentHash);
      const sigma = revision.results.steps.find((s: { stepId: string }) => s.stepId === 'sigma');
      expect(sigma.status).to.equal('ok');
      const ws = await t.clients.viewer.get(`/api/worksheets/${worksheetId}`).expect(200);
      expect(ws.body.head.id).to.equal(revision.id);
      // Defaults of the format are filled in before hashing and storing.
      expect(revision.document.steps[2].params.methods).to.deep.equal(['chi-square', 'bonett']);
    });

    it('answers 409 head_moved with the current head when the base is not the head, and stores nothing', async () => {
      const { worksheetId, first, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
      const res = await t.clients.owner
        .post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: first, document: boreDocument({ levels: [0.99] }) })
        .expect(409);
      expectError(res.body, 'head_moved');
      expect(res.body.error.details.baseRevisionId).to.equal(first);
      expect(res.body.error.details.head).to.include({ id: revision.id, number: 2 });
      expect(res.body.error.details.head.author.name).to.equal(t.users.editor.name);
      const timeline = await t.clients.viewer.get(`/api/worksheets/${worksheetId}/revisions`).expect(200);
      expect(timeline.body.total).to.equal(2);
    });

    it('of two saves from the same base, exactly one succeeds and the other gets 409; nothing is lost', async () => {
      const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
      const a = t.clients.editor.post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: revision.id, document: boreDocument({ levels: [0.9] }), message: 'at 90 %' });
      const b = t.clients.owner.post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: revision.id, document: boreDocument({ levels: [0.99] }), message: 'at 99 %' });
      const [ra, rb] = await Promise.all([a, b]);
      expect([ra.status, rb.status].sort()).to.deep.equal([201, 409]);
      const winner = ra.status === 201 ? ra : rb;
      const loser = ra.status === 201 ? rb : ra;
      expect(loser.body.error.details.head.id).to.equal(winner.body.revision.id);
      const timeline = await t.clients.viewer.get(`/api/worksheets/${worksheetId}/revisions`).expect(200);
      expect(timeline.body.items.map((r: { number: number }) => r.number)).to.deep.equal([3, 2, 1]);
      expect(timeline.body.items[0].id).to.equal(winner.body.revision.id);
      expect(timeline.body.items[0].parentId).to.equal(revision.id);
      // The loser can rebase on the new head and save: its work is not lost.
      const retry = await (loser === ra ? t.clients.editor : t.clients.owner)
        .post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: winner.body.revision.id, document: boreDocument({ levels: [0.9, 0.99] }) })
        .expect(201);
      expect(retry.body.revision.number).to.equal(4);
    });

    it('stores identical content as a new revision when asked (the user saved)', async () => {
      const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
      const res = await t.clients.editor.post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: revision.id, document: revision.document }).expect(201);
      expect(res.body.revision.number).to.equal(3);
      expect(res.body.revision.contentHash).to.equal(revision.contentHash);
      expect(res.body.revision.resultsHash).to.equal(revision.resultsHash);
    });

    it('refuses bad bodies with the field named and stores nothing', async () => {
      const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
      const url = `/api/worksheets/${worksheetId}/revisions`;
      const noBase = await t.clients.editor.post(url, { document: boreDocument() }).expect(400);
      expect(noBase.body.error.details[0].field).to.equal('baseRevisionId');
      const noDoc = await t.clients.editor.post(url, { baseRevisionId: revision.id }).expect(400);
      expect(noDoc.body.error.details[0].field).to.equal('document');
      const badDoc = boreDocument();
      (badDoc.steps[2].params as { levels: unknown }).levels = 'ninety-five';
      const bad = await t.clients.editor.post(url, { baseRevisionId: revision.id, document: badDoc }).expect(400);
      expectError(bad.body, 'validation');
      expect(bad.body.error.details.map((d: { field: string }) => d.field)).to.include('document.steps.2.params.levels');
      const dup = boreDocument();
      dup.steps[1].id = 'bores';
      const dupRes = await t.clients.editor.post(url, { baseRevisionId: revision.id, document: dup }).expect(400);
      expect(dupRes.body.error.details.map((d: { field: string }) => d.field)).to.include('document.steps.1.id');
      const foreignBase = await createBoreWorksheet(t.clients.editor, t.teamId);
      const wrongBase = await t.clients.editor.post(url, { baseRevisionId: foreignBase.revision.id, document: boreDocument() }).expect(422);
      expectError(wrongBase.body, 'bad_base');
      const unknown = boreDocument();
      unknown.steps[0] = { id: 'bores', kind: 'data', params: { origin: 'dataset', datasetId: 'f'.repeat(64) } };
      const missing = await t.clients.editor.post(url, { baseRevisionId: revision.id, document: unknown }).expect(422);
      expectError(missing.body, 'unknown_dataset');
      expect(missing.body.error.details[0].field).to.equal('document.steps.0.params.datasetId');
      const timeline = await t.clients.viewer.get(`/api/worksheets/${worksheetId}/revisions`).expect(200);
      expect(timeline.body.total).to.equal(2);
    });

    it('reports a step with a bad parameter inside the results, not as an HTTP error', async () => {
      const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
      const res = await t.clients.editor
        .post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: revision.id, document: boreDocument({ levels: [1.5] }) })
        .expect(201);
      const sigma = res.body.revision.results.steps.find((s: { stepId: string }) => s.stepId === 'sigma');
      expect(sigma.status).to.equal('error');
      expect(sigma.error.field).to.match(/^params\.levels/);
    });

    it('allows editors and owners only', async () => {
      const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
      const body = { baseRevisionId: revision.id, document: boreDocument() };
      await t.clients.reviewer.post(`/api/worksheets/${worksheetId}/revisions`, body).expect(403);
      await t.clients.viewer.post(`/api/worksheets/${worksheetId}/revisions`, body).expect(403);
      await t.clients.outsider.post(`/api/worksheets/${worksheetId}/revisions`, body).expect(404);
    });
  });

  describe('draft evaluation', () => {
    it('evaluates without saving, with the same results as a save, and caches by content hash', async () => {
      const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
      const same = await t.clients.viewer.post(`/api/worksheets/${worksheetId}/evaluate`, { document: revision.document }).expect(200);
      expect(same.body.resultsHash).to.equal(revision.resultsHash);
      expect(same.body.contentHash).to.equal(revision.contentHash);
      expect(same.body.results).to.deep.equal(revision.results);
      expect(same.body.cached).to.equal(true);

      const draft = boreDocument({ levels: [0.9, 0.95, 0.99], title: `Draft ${Date.now()}` });
      const fresh = await t.clients.viewer.post(`/api/worksheets/${worksheetId}/evaluate`, { document: draft }).expect(200);
      expect(fresh.body.cached).to.equal(false);
      const again = await t.clients.viewer.post(`/api/worksheets/${worksheetId}/evaluate`, { document: draft }).expect(200);
      expect(again.body.cached).to.equal(true);
      expect(again.body.resultsHash).to.equal(fresh.body.resultsHash);
      const timeline = await t.clients.viewer.get(`/api/worksheets/${worksheetId}/revisions`).expect(200);
      expect(timeline.body.total).to.equal(2);
    });

    it('refuses an invalid draft with 400 and the field named', async () => {
      const { worksheetId } = await createBoreWorksheet(t.clients.editor, t.teamId);
      const res = await t.clients.viewer.post(`/api/worksheets/${worksheetId}/evaluate`, { document: { format: 'something-else' } }).expect(400);
      expectError(res.body, 'validation');
      await t.clients.outsider.post(`/api/worksheets/${worksheetId}/evaluate`, { document: boreDocument() }).expect(404);
    });
  });

  describe('timeline and one revision', () => {
    it('lists revisions newest first with authors, and serves one revision in full', async () => {
      const { worksheetId, first, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
      const timeline = await t.clients.viewer.get(`/api/worksheets/${worksheetId}/revisions`).expect(200);
      expect(timeline.body.items.map((r: { id: string }) => r.id)).to.deep.equal([revision.id, first]);
      expect(timeline.body.items[0]).to.not.have.property('document');
      const one = await t.clients.viewer.get(`/api/revisions/${first}`).expect(200);
      expect(one.body.isHead).to.equal(false);
      expect(one.body.revision.document.steps).to.deep.equal([]);
      expect(one.body.worksheet.id).to.equal(worksheetId);
      await t.clients.outsider.get(`/api/revisions/${first}`).expect(404);
      const page = await t.clients.viewer.get(`/api/worksheets/${worksheetId}/revisions?page=2&pageSize=1`).expect(200);
      expect(page.body.items.map((r: { id: string }) => r.id)).to.deep.equal([first]);
    });
  });

  describe('re-check against the current engine', () => {
    it('reports a match for an untouched revision', async () => {
      const { revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
      const res = await t.clients.viewer.post(`/api/revisions/${revision.id}/recheck`).expect(200);
      expect(res.body).to.include({ revisionId: revision.id, matches: true, storedResultsHash: revision.resultsHash, currentResultsHash: revision.resultsHash });
      expect(res.body.changes).to.equal(null);
    });

    it('reports drift for results an older engine computed differently, and leaves the row untouched', async () => {
      const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
      // A revision as an earlier engine version might have stored it: same content, other numbers.
      const old = structuredClone(revision.results);
      const sigma = old.steps.find((s: { stepId: string }) => s.stepId === 'sigma');
      const value = sigma.values.find((v: { value: unknown }) => typeof v.value === 'number');
      value.value = value.value * 1.01;
      const oldJson = canonicalJson(old);
      const [row] = await h.database.db
        .insert(revisions)
        .values({
          worksheetId,
          number: 3,
          parentId: revision.id,
          authorId: t.users.editor.id,
          message: 'stored by engine 0.9.0',
          content: canonicalJson(revision.document),
          contentHash: revision.contentHash,
          engineVersion: '0.9.0',
          results: oldJson,
          resultsHash: sha256Hex(oldJson),
        })
        .returning();
      await h.database.db.update(worksheets).set({ headRevisionId: row.id }).where(eq(worksheets.id, worksheetId));
      const res = await t.clients.viewer.post(`/api/revisions/${row.id}/recheck`).expect(200);
      expect(res.body).to.include({ matches: false, storedEngineVersion: '0.9.0', storedResultsHash: sha256Hex(oldJson), currentResultsHash: revision.resultsHash });
      expect(res.body.changes.results.map((c: { stepId: string; path: string }) => `${c.stepId}:${c.path}`)).to.deep.equal([`sigma:values.${value.id}`]);
      const [after] = await h.database.db.select().from(revisions).where(eq(revisions.id, row.id));
      expect(after).to.deep.equal(row);
    });
  });

  describe('fork', () => {
    it('forks a revision into a team where I am an editor, recording the origin', async () => {
      const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
      const lab = await t.clients.editor.post('/api/teams', { name: 'Editor sandbox' }).expect(201);
      const res = await t.clients.editor
        .post(`/api/revisions/${revision.id}/fork`, { teamId: lab.body.team.id, document: boreDocument({ levels: [0.99] }), title: 'Bore gauge at 99 %' })
        .expect(201);
      expect(res.body.worksheet).to.include({ teamId: lab.body.team.id, title: 'Bore gauge at 99 %', revisionCount: 1 });
      expect(res.body.worksheet.origin).to.deep.equal({ revisionId: revision.id, revisionNumber: 2, worksheetId, worksheetTitle: 'Bore gauge repeatability' });
      expect(res.body.head.message).to.equal('Forked from revision 2');
      expect(res.body.head.document.steps[2].params.levels).to.deep.equal([0.99]);
      const timeline = await t.clients.viewer.get(`/api/worksheets/${worksheetId}/revisions`).expect(200);
      expect(timeline.body.forks).to.deep.equal([]); // the viewer is not in the sandbox team
      const own = await t.clients.editor.get(`/api/worksheets/${worksheetId}/revisions`).expect(200);
      expect(own.body.forks.map((f: { worksheetId: string }) => f.worksheetId)).to.deep.equal([res.body.worksheet.id]);
      // A copy without a document keeps the content exactly.
      const copy = await t.clients.viewer.post('/api/teams', { name: 'Viewer sandbox' }).expect(201);
      const plain = await t.clients.viewer.post(`/api/revisions/${revision.id}/fork`, { teamId: copy.body.team.id }).expect(201);
      expect(plain.body.head.contentHash).to.equal(revision.contentHash);
    });

    it('refuses a target team where I am not an editor (403) or not a member (404)', async () => {
      const { revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
      const res = await t.clients.viewer.post(`/api/revisions/${revision.id}/fork`, { teamId: t.teamId }).expect(403);
      expectError(res.body, 'forbidden');
      const foreign = await t.clients.outsider.post('/api/teams', { name: 'Outsider team' }).expect(201);
      await t.clients.editor.post(`/api/revisions/${revision.id}/fork`, { teamId: foreign.body.team.id }).expect(404);
      await t.clients.outsider.post(`/api/revisions/${revision.id}/fork`, { teamId: foreign.body.team.id }).expect(404);
    });
  });
});
