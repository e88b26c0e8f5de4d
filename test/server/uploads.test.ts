// Uploads: CSV, TSV and XLSX into content-addressed datasets; skipped cells reported; the same
// bytes stored once; every malformed file a 4xx naming the problem, never a 500.
import { expect } from 'chai';
import { eq, sql } from 'drizzle-orm';
import { sha256Hex } from '@shared/engine/hash';
import { datasets } from '../../schema/index';
import type { Client } from './support';
import { xlsx } from './uploads-xlsx';
import { expectError, openServiceApp, teamOfRoles, type ServiceHarness, type TeamOfRoles } from './worksheets-support';

function upload(client: Client, teamId: string, bytes: Buffer | string, name: string) {
  return client.agent
    .post(`/api/teams/${teamId}/datasets`)
    .set('X-CSRF-Token', client.token)
    .attach('file', Buffer.isBuffer(bytes) ? bytes : Buffer.from(bytes), name);
}

const boresCsv = 'run,deviation,operator\n1,2.1,A\n2,1.8,B\n3,2.4,A\n4,2.0,B\n5,1.7,A\n6,2.3,B\n';

describe('uploads API', function () {
  this.timeout(240_000);
  let h: ServiceHarness;
  let t: TeamOfRoles;

  before(async () => {
    h = await openServiceApp();
    t = await teamOfRoles(h, 'Upload Suite');
  });
  after(() => h?.close());

  it('reads a CSV: columns, types, row count, delimiter, id = SHA-256 of the bytes', async () => {
    const res = await upload(t.clients.editor, t.teamId, boresCsv, 'bores.csv').expect(201);
    const d = res.body.dataset;
    expect(res.body.deduplicated).to.equal(false);
    expect(d).to.include({ id: sha256Hex(new TextEncoder().encode(boresCsv)), name: 'bores.csv', rowCount: 6, delimiter: ',', decimalComma: false, hasHeader: true, skippedCount: 0 });
    expect(d.columns).to.deep.equal([
      { name: 'run', type: 'number', missing: 0 },
      { name: 'deviation', type: 'number', missing: 0 },
      { name: 'operator', type: 'text', missing: 0 },
    ]);
    expect(d.uploadedBy).to.deep.equal({ id: t.users.editor.id, name: t.users.editor.name });
  });

  it('stores the same bytes once, whoever uploads them again', async () => {
    const csv = 'x\n1.5\n1.7\n1.6\n';
    const first = await upload(t.clients.editor, t.teamId, csv, 'a.csv').expect(201);
    const again = await upload(t.clients.owner, t.teamId, csv, 'renamed.csv').expect(200);
    expect(again.body.deduplicated).to.equal(true);
    expect(again.body.dataset.id).to.equal(first.body.dataset.id);
    const other = await teamOfRoles(h, 'Upload Other');
    const elsewhere = await upload(other.clients.editor, other.teamId, csv, 'b.csv').expect(200);
    expect(elsewhere.body.dataset.name).to.equal('b.csv');
    const [{ n }] = await h.database.db.select({ n: sql<number>`count(*)::int` }).from(datasets).where(eq(datasets.id, first.body.dataset.id));
    expect(n).to.equal(1);
  });

  it('detects tab delimiters and decimal commas (TSV from a European spreadsheet)', async () => {
    const tsv = 'Lauf\tAbweichung\n1\t2,1\n2\t1,8\n3\t2,4\n';
    const res = await upload(t.clients.editor, t.teamId, tsv, 'bores.tsv').expect(201);
    expect(res.body.dataset).to.include({ delimiter: '\t', decimalComma: true, rowCount: 3, mediaType: 'text/tab-separated-values' });
    const rows = await t.clients.viewer.get(`/api/teams/${t.teamId}/datasets/${res.body.dataset.id}`).expect(200);
    expect(rows.body.rows.values).to.deep.equal([
      [1, 2.1],
      [2, 1.8],
      [3, 2.4],
    ]);
  });

  it('reads the first sheet of an XLSX workbook', async () => {
    const book = xlsx([
      ['run', 'deviation', 'operator'],
      [1, 2.1, 'A'],
      [2, 1.8, 'B'],
      [3, 'n/a', 'A'],
      [4, 2.4, null],
    ]);
    const res = await upload(t.clients.editor, t.teamId, book, 'bores.xlsx').expect(201);
    expect(res.body.dataset).to.include({ rowCount: 4, mediaType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet', hasHeader: true });
    expect(res.body.dataset.columns.map((c: { type: string }) => c.type)).to.deep.equal(['number', 'number', 'text']);
    expect(res.body.dataset.skipped).to.deep.equal([{ line: 4, column: 2, reason: res.body.dataset.skipped[0].reason }]);
    expect(res.body.dataset.skipped[0].reason).to.match(/deviation/);
    const page = await t.clients.viewer.get(`/api/teams/${t.teamId}/datasets/${res.body.dataset.id}?offset=2&limit=2`).expect(200);
    expect(page.body.rows.values).to.deep.equal([
      [3, null, 'A'],
      [4, 2.4, null],
    ]);
  });

  it('reports text in a numeric column as skipped cells with line, column and why', async () => {
    const csv = 'run,deviation\n1,2.1\n2,abc\n3,\n4,2.0\n';
    const res = await upload(t.clients.editor, t.teamId, csv, 'gaps.csv').expect(201);
    const d = res.body.dataset;
    expect(d.rowCount).to.equal(4);
    expect(d.columns[1]).to.deep.equal({ name: 'deviation', type: 'number', missing: 2 });
    expect(d.skippedCount).to.equal(2);
    expect(d.skipped.map((s: { line: number; column: number }) => [s.line, s.column])).to.deep.equal([
      [3, 2],
      [4, 2],
    ]);
    for (const s of d.skipped) expect(s.reason).to.be.a('string').and.match(/deviation/);
  });

  describe('malformed files get a 4xx that names the problem', () => {
    const cases: { label: string; name: string; bytes: () => Buffer | string; status: number; code: string; message: RegExp; line?: number }[] = [
      { label: 'empty file', name: 'empty.csv', bytes: () => '', status: 422, code: 'empty_file', message: /empty/i },
      { label: 'only blank lines', name: 'blank.csv', bytes: () => '\n \n\t\n', status: 422, code: 'empty_file', message: /empty|no data/i },
      { label: 'header and no rows', name: 'header.csv', bytes: () => 'run,deviation\n', status: 422, code: 'empty_file', message: /no data rows/i },
      {
        label: 'ragged rows',
        name: 'ragged.csv',
        bytes: () => 'run,deviation,operator\n1,2.1,A\n2,1.8\n3,2.4,A\n',
        status: 422,
        code: 'bad_file',
        message: /Line 3 has 2 fields where 3 are expected/,
        line: 3,
      },
      {
        label: 'wrong delimiter (space-separated numbers read as one text column)',
        name: 'spaces.csv',
        bytes: () => 'run deviation\n1 2.1\n2 1.8\n3 2.4\n',
        status: 422,
        code: 'bad_file',
        message: /delimiter/,
      },
      { label: 'text in every numeric cell', name: 'words.csv', bytes: () => 'operator,shift\nA,early\nB,late\n', status: 422, code: 'bad_file', message: /No numeric column/ },
      {
        label: 'binary garbage',
        name: 'garbage.csv',
        bytes: () => Buffer.from(Array.from({ length: 4096 }, (_, i) => (i * 7919 + 13) % 256)),
        status: 415,
        code: 'unsupported_file',
        message: /not a text table/,
      },
      { label: 'an image named .csv', name: 'photo.csv', bytes: () => Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13]), status: 415, code: 'unsupported_file', message: /binary/ },
      { label: 'a broken XLSX (ZIP header, then garbage)', name: 'broken.xlsx', bytes: () => Buffer.concat([Buffer.from([0x50, 0x4b, 0x03, 0x04]), Buffer.alloc(200, 7)]), status: 415, code: 'unsupported_file', message: /XLSX/ },
      { label: 'an old binary .xls workbook', name: 'old.xls', bytes: () => Buffer.concat([Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]), Buffer.alloc(512)]), status: 415, code: 'unsupported_file', message: /\.xls/ },
      { label: 'an empty workbook sheet', name: 'empty.xlsx', bytes: () => xlsx([]), status: 422, code: 'empty_file', message: /empty/ },
      {
        label: 'more than 2,000,000 rows',
        name: 'long.csv',
        bytes: () => 'x\n' + '1\n'.repeat(2_000_001),
        status: 422,
        code: 'too_many_rows',
        message: /more than 2,000,000 data rows/,
      },
      { label: 'a file over 50 MB', name: 'huge.csv', bytes: () => Buffer.alloc(50 * 1024 * 1024 + 1, '1\n'), status: 413, code: 'file_too_large', message: /50 MB/ },
    ];

    for (const c of cases) {
      it(c.label, async () => {
        const res = await upload(t.clients.editor, t.teamId, c.bytes(), c.name);
        expect(res.status, JSON.stringify(res.body)).to.equal(c.status);
        expectError(res.body, c.code);
        expect(res.body.error.message).to.match(c.message);
        if (c.line !== undefined) expect(res.body.error.details.line).to.equal(c.line);
      });
    }

    it('no file in the request', async () => {
      const res = await t.clients.editor.post(`/api/teams/${t.teamId}/datasets`, {}).expect(400);
      expectError(res.body, 'no_file');
      const wrongField = await t.clients.editor.agent
        .post(`/api/teams/${t.teamId}/datasets`)
        .set('X-CSRF-Token', t.clients.editor.token)
        .attach('data', Buffer.from(boresCsv), 'bores.csv')
        .expect(400);
      expectError(wrongField.body, 'bad_upload');
    });
  });

  it('lets editors upload, members read, and nobody else see a dataset', async () => {
    const csv = 'y\n3.1\n3.3\n3.2\n';
    await upload(t.clients.viewer, t.teamId, csv, 'v.csv').expect(403);
    await upload(t.clients.reviewer, t.teamId, csv, 'r.csv').expect(403);
    await upload(t.clients.outsider, t.teamId, csv, 'o.csv').expect(404);
    const ok = await upload(t.clients.editor, t.teamId, csv, 'e.csv').expect(201);
    const list = await t.clients.viewer.get(`/api/teams/${t.teamId}/datasets?pageSize=100`).expect(200);
    expect(list.body.items.map((d: { id: string }) => d.id)).to.include(ok.body.dataset.id);
    // Another team does not learn the dataset exists, even knowing its hash.
    const other = await teamOfRoles(h, 'Upload Snoop');
    await other.clients.owner.get(`/api/teams/${other.teamId}/datasets/${ok.body.dataset.id}`).expect(404);
    await t.clients.outsider.get(`/api/teams/${t.teamId}/datasets/${ok.body.dataset.id}`).expect(404);
    await t.clients.viewer.get(`/api/teams/${t.teamId}/datasets/not-a-hash`).expect(404);
  });
});
