// Worksheets API: create (blank, example, import), list (search, team filter, sort, pages), get,
// archive and restore, export that imports back with the same content hash.
import { expect } from 'chai';
import { WORKSHEET_FORMAT } from '@shared/format/worksheet';
import { canonicalJson, sha256Hex } from '@shared/engine/hash';
import { listExamples } from '../../server/worksheets/examples';
import { boreDocument, createBoreWorksheet, expectError, openServiceApp, teamOfRoles, type ServiceHarness, type TeamOfRoles } from './worksheets-support';

describe('worksheets API', function () {
  this.timeout(180_000);
  let h: ServiceHarness;
  let t: TeamOfRoles;

  before(async () => {
    h = await openServiceApp();
    t = await teamOfRoles(h, 'Worksheet Suite');
  });
  after(() => h?.close());

  it('creates a blank worksheet with a first revision and results', async () => {
    const res = await t.clients.editor.post(`/api/teams/${t.teamId}/worksheets`, { source: 'blank', title: 'Surface plate flatness' }).expect(201);
    expect(res.body.worksheet).to.include({ title: 'Surface plate flatness', teamId: t.teamId, teamName: 'Worksheet Suite', archived: false, revisionCount: 1, published: false });
    expect(res.body.worksheet.createdBy).to.deep.equal({ id: t.users.editor.id, name: t.users.editor.name });
    const head = res.body.head;
    expect(head).to.include({ number: 1, parentId: null, message: 'Created' });
    expect(head.document).to.deep.equal({ format: WORKSHEET_FORMAT, version: 1, title: 'Surface plate flatness', steps: [] });
    expect(head.results.steps).to.deep.equal([]);
    // The content hash is the SHA-256 of the canonical JSON of the stored document.
    expect(head.contentHash).to.equal(sha256Hex(canonicalJson(head.document)));
    expect(head.resultsHash).to.equal(sha256Hex(canonicalJson(head.results)));
    expect(head.author.email, 'no e-mail addresses in revisions').to.equal(undefined);
  });

  it('creates a worksheet from every example in examples/, with its data files', async () => {
    const examples = await t.clients.viewer.get('/api/examples').expect(200);
    expect(examples.body.examples.map((e: { id: string }) => e.id)).to.deep.equal(listExamples().map((e) => e.id));
    for (const example of examples.body.examples as { id: string; title: string }[]) {
      const res = await t.clients.editor.post(`/api/teams/${t.teamId}/worksheets`, { source: 'example', exampleId: example.id }).expect(201);
      expect(res.body.head.document.title).to.equal(example.title);
      const errors = res.body.head.results.steps.filter((s: { status: string }) => s.status !== 'ok');
      expect(errors, `steps of example ${example.id} that failed`).to.deep.equal([]);
    }
    const missing = await t.clients.editor.post(`/api/teams/${t.teamId}/worksheets`, { source: 'example', exampleId: 'no-such-example' }).expect(404);
    expectError(missing.body, 'not_found');
  });

  it('refuses a create body that names no source', async () => {
    const res = await t.clients.editor.post(`/api/teams/${t.teamId}/worksheets`, { title: 'x' }).expect(400);
    expectError(res.body, 'validation');
    expect(res.body.error.details[0].field).to.equal('source');
  });

  it('gets a worksheet with its head revision, results and my role', async () => {
    const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId);
    const res = await t.clients.viewer.get(`/api/worksheets/${worksheetId}`).expect(200);
    expect(res.body.myRole).to.equal('viewer');
    expect(res.body.head.id).to.equal(revision.id);
    expect(res.body.worksheet.revisionCount).to.equal(2);
    expect(res.body.head.results.steps.map((s: { stepId: string }) => s.stepId)).to.deep.equal(['bores', 'spread', 'sigma', 'target']);
    await t.clients.outsider.get(`/api/worksheets/${worksheetId}`).expect(404);
    await t.clients.viewer.get('/api/worksheets/not-a-uuid').expect(404);
    await t.clients.viewer.get('/api/worksheets/00000000-0000-4000-8000-000000000000').expect(404);
  });

  describe('list', () => {
    let other: TeamOfRoles;
    const titles = ['Lathe spindle runout', 'Caliper repeatability A', 'caliper repeatability B', 'Micrometer anvil wear'];

    before(async () => {
      other = await teamOfRoles(h, 'List Suite');
      for (const title of titles) {
        await other.clients.editor.post(`/api/teams/${other.teamId}/worksheets`, { source: 'blank', title }).expect(201);
      }
    });

    it('searches titles case-insensitively, within my teams only', async () => {
      const res = await other.clients.viewer.get('/api/worksheets?q=CALIPER&sort=title&order=asc').expect(200);
      expect(res.body.items.map((w: { title: string }) => w.title)).to.deep.equal(['Caliper repeatability A', 'caliper repeatability B']);
      expect(res.body.total).to.equal(2);
      const outsider = await t.clients.outsider.get('/api/worksheets?q=caliper').expect(200);
      expect(outsider.body.total).to.equal(0);
      // Wildcards in the search are literal characters.
      const pct = await other.clients.viewer.get('/api/worksheets?q=%25').expect(200);
      expect(pct.body.total).to.equal(0);
    });

    it('filters by team, and answers 404 for a team I am not in', async () => {
      const mine = await other.clients.viewer.get(`/api/worksheets?teamId=${other.teamId}`).expect(200);
      expect(mine.body.total).to.equal(titles.length);
      expect(mine.body.items.every((w: { teamId: string }) => w.teamId === other.teamId)).to.equal(true);
      await other.clients.viewer.get(`/api/worksheets?teamId=${t.teamId}`).expect(404);
    });

    it('sorts by title, created and updated time, both ways, and paginates', async () => {
      const asc = await other.clients.viewer.get(`/api/worksheets?teamId=${other.teamId}&sort=title&order=asc`).expect(200);
      const sorted = [...titles].sort((a, b) => a.toLowerCase().localeCompare(b.toLowerCase()));
      expect(asc.body.items.map((w: { title: string }) => w.title)).to.deep.equal(sorted);
      const desc = await other.clients.viewer.get(`/api/worksheets?teamId=${other.teamId}&sort=title&order=desc`).expect(200);
      expect(desc.body.items.map((w: { title: string }) => w.title)).to.deep.equal([...sorted].reverse());
      const created = await other.clients.viewer.get(`/api/worksheets?teamId=${other.teamId}&sort=created&order=asc`).expect(200);
      expect(created.body.items.map((w: { title: string }) => w.title)).to.deep.equal(titles);
      const page2 = await other.clients.viewer.get(`/api/worksheets?teamId=${other.teamId}&sort=created&order=asc&page=2&pageSize=3`).expect(200);
      expect(page2.body).to.include({ total: 4, page: 2, pageSize: 3 });
      expect(page2.body.items.map((w: { title: string }) => w.title)).to.deep.equal([titles[3]]);
      // Saving a revision moves a worksheet to the top of "recently updated".
      const target = created.body.items[1];
      await other.clients.editor
        .post(`/api/worksheets/${target.id}/revisions`, { baseRevisionId: target.head.id, document: { ...boreDocument(), title: target.title } })
        .expect(201);
      const updated = await other.clients.viewer.get(`/api/worksheets?teamId=${other.teamId}`).expect(200);
      expect(updated.body.items[0].id).to.equal(target.id);
    });

    it('refuses bad list parameters with the field named', async () => {
      for (const query of ['sort=size', 'order=up', 'page=0', 'pageSize=1000', 'archived=maybe', 'teamId=x']) {
        const res = await other.clients.viewer.get(`/api/worksheets?${query}`).expect(400);
        expectError(res.body, 'validation');
        expect(res.body.error.details[0].field).to.equal(query.split('=')[0]);
      }
    });
  });

  describe('archive and restore', () => {
    it('lets owners archive (read-only, listed under archived) and restore', async () => {
      const { worksheetId } = await createBoreWorksheet(t.clients.editor, t.teamId, boreDocument({ title: 'Bore gauge to archive' }));
      await t.clients.editor.post(`/api/worksheets/${worksheetId}/archive`).expect(403);
      const archived = await t.clients.owner.post(`/api/worksheets/${worksheetId}/archive`).expect(200);
      expect(archived.body.worksheet.archived).to.equal(true);
      await t.clients.owner.post(`/api/worksheets/${worksheetId}/archive`).expect(200);

      const active = await t.clients.viewer.get(`/api/worksheets?teamId=${t.teamId}&q=to%20archive`).expect(200);
      expect(active.body.total).to.equal(0);
      const listed = await t.clients.viewer.get(`/api/worksheets?teamId=${t.teamId}&q=to%20archive&archived=true`).expect(200);
      expect(listed.body.items.map((w: { id: string }) => w.id)).to.deep.equal([worksheetId]);

      const head = listed.body.items[0].head.id;
      const save = await t.clients.editor.post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: head, document: boreDocument() }).expect(409);
      expectError(save.body, 'archived');

      const restored = await t.clients.owner.post(`/api/worksheets/${worksheetId}/restore`).expect(200);
      expect(restored.body.worksheet.archived).to.equal(false);
      await t.clients.editor.post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: head, document: boreDocument() }).expect(201);
    });
  });

  describe('export and import', () => {
    it('exports a file that imports back with the same content hash and results hash', async () => {
      const { worksheetId, first, revision } = await createBoreWorksheet(t.clients.editor, t.teamId, boreDocument({ title: 'Exported bore gauge' }));
      const exported = await t.clients.viewer.get(`/api/worksheets/${worksheetId}/export`).expect(200);
      expect(exported.headers['content-disposition']).to.equal('attachment; filename="exported-bore-gauge.spreadproof.json"');
      const file = JSON.parse(exported.text);
      expect(file).to.include({ format: 'spreadproof-export', exportVersion: 1, contentHash: revision.contentHash });
      // Byte-identical when exported again.
      const again = await t.clients.viewer.get(`/api/worksheets/${worksheetId}/export`).expect(200);
      expect(again.text).to.equal(exported.text);

      const imported = await t.clients.editor.agent
        .post(`/api/teams/${t.teamId}/worksheets/import`)
        .set('X-CSRF-Token', t.clients.editor.token)
        .attach('file', Buffer.from(exported.text), 'exported-bore-gauge.spreadproof.json')
        .expect(201);
      expect(imported.body.head.contentHash).to.equal(revision.contentHash);
      expect(imported.body.head.resultsHash).to.equal(revision.resultsHash);
      expect(imported.body.head.message).to.equal('Imported');
      expect(imported.body.worksheet.id).to.not.equal(worksheetId);

      // An older revision can be exported by id; a revision of another worksheet cannot.
      const older = await t.clients.viewer.get(`/api/worksheets/${worksheetId}/export?revisionId=${first}`).expect(200);
      expect(JSON.parse(older.text).document.steps).to.deep.equal([]);
      const foreign = await t.clients.viewer.get(`/api/worksheets/${worksheetId}/export?revisionId=${imported.body.head.id}`).expect(404);
      expectError(foreign.body, 'not_found');
    });

    it('carries uploaded datasets in the file, verifies their hash on import, and refuses damaged files', async () => {
      const csv = 'run,deviation\n1,2.1\n2,1.8\n3,2.4\n4,2.0\n5,1.7\n6,2.2\n';
      const up = await t.clients.editor.agent
        .post(`/api/teams/${t.teamId}/datasets`)
        .set('X-CSRF-Token', t.clients.editor.token)
        .attach('file', Buffer.from(csv), 'bores.csv')
        .expect((r) => expect([200, 201]).to.include(r.status));
      const datasetId = up.body.dataset.id;
      const doc = {
        format: WORKSHEET_FORMAT,
        version: 1,
        title: 'Bores from a file',
        steps: [
          { id: 'd', kind: 'data', params: { origin: 'dataset', datasetId, fileName: 'bores.csv' } },
          { id: 's', kind: 'spread-summary', params: { source: { step: 'd', column: 'deviation' } } },
        ],
      };
      const { worksheetId, revision } = await createBoreWorksheet(t.clients.editor, t.teamId, doc as never);
      const exported = await t.clients.viewer.get(`/api/worksheets/${worksheetId}/export`).expect(200);
      const file = JSON.parse(exported.text);
      expect(file.datasets).to.have.length(1);
      expect(Buffer.from(file.datasets[0].bytesBase64, 'base64').toString()).to.equal(csv);

      // Into another team that has never seen the file: the dataset comes with it.
      const other = await teamOfRoles(h, 'Import Target');
      const imported = await other.clients.editor.post(`/api/teams/${other.teamId}/worksheets/import`, file).expect(201);
      expect(imported.body.head.contentHash).to.equal(revision.contentHash);
      expect(imported.body.head.resultsHash).to.equal(revision.resultsHash);
      await other.clients.viewer.get(`/api/teams/${other.teamId}/datasets/${datasetId}`).expect(200);

      const tampered = structuredClone(file);
      tampered.datasets[0].bytesBase64 = Buffer.from(csv.replace('2.1', '9.9')).toString('base64');
      const bad = await other.clients.editor.post(`/api/teams/${other.teamId}/worksheets/import`, tampered).expect(422);
      expectError(bad.body, 'dataset_mismatch');

      const notOurs = await other.clients.editor.post(`/api/teams/${other.teamId}/worksheets/import`, { hello: 'world' }).expect(400);
      expectError(notOurs.body, 'bad_import');
      const broken = await other.clients.editor.agent
        .post(`/api/teams/${other.teamId}/worksheets/import`)
        .set('X-CSRF-Token', other.clients.editor.token)
        .attach('file', Buffer.from('{"format": "spreadproof-export", '), 'broken.json')
        .expect(400);
      expectError(broken.body, 'bad_import');
      const invalid = await other.clients.editor.post(`/api/teams/${other.teamId}/worksheets/import`, { ...doc, steps: [{ id: '1bad', kind: 'note', params: {} }] }).expect(400);
      expectError(invalid.body, 'validation');
      expect(invalid.body.error.details.map((d: { field: string }) => d.field)).to.include('document.steps.0.id');
    });
  });
});
