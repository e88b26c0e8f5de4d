/**
 * `npm run db:backup` / `npm run db:restore` (server/db/backup.ts, Debian's pg_dump and
 * pg_restore): a database with worksheets, revisions, a dataset, a review, a link and a fork is
 * backed up through the command line, restored into an empty database, and compared row for row:
 * every revision's content and results hash (stored and recomputed from the stored text), every
 * dataset's bytes against its SHA-256 id, the row count of every table, the migrations applied,
 * and the immutability triggers. The app then runs on the restored copy (same sign-in, same
 * revisions). A restore over a database that holds worksheets needs --yes.
 */
import { execFile } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { existsSync, rmSync, statSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { expect } from 'chai';
import { backupDir, defaultBackupFile } from '../../server/db/backup';
import { projectRoot } from '../../server/paths';
import { createTestDatabase, type TestDatabase } from '../support/db';
import { Client, testPassword } from '../server/support';
import { boreDocument, createBoreWorksheet, teamOfRoles } from '../server/worksheets-support';
import { hashesOfAnswer, openAppOn, storedRevisions, withClient, type AppOn } from './support';

const execFileAsync = promisify(execFile);

/** Runs `tsx server/db/backup.ts …` (what the npm scripts run) against `url`. */
async function cli(url: string, args: string[]): Promise<{ code: number; output: string }> {
  try {
    const { stdout, stderr } = await execFileAsync(process.execPath, ['--import', 'tsx', path.join('server', 'db', 'backup.ts'), ...args], {
      cwd: projectRoot,
      env: { ...process.env, DATABASE_URL: url },
    });
    return { code: 0, output: stdout + stderr };
  } catch (error) {
    const e = error as { code?: number; stdout?: string; stderr?: string };
    return { code: typeof e.code === 'number' ? e.code : 1, output: `${e.stdout ?? ''}${e.stderr ?? ''}` };
  }
}

async function tableCounts(url: string): Promise<Record<string, number>> {
  return withClient(url, async (client) => {
    const { rows } = await client.query<{ table_name: string }>(
      "select table_name from information_schema.tables where table_schema = 'public' and table_type = 'BASE TABLE' order by table_name",
    );
    const counts: Record<string, number> = {};
    for (const { table_name } of rows) {
      counts[table_name] = (await client.query<{ n: number }>(`select count(*)::int as n from "${table_name}"`)).rows[0].n;
    }
    counts['drizzle.__drizzle_migrations'] = (await client.query<{ n: number }>('select count(*)::int as n from drizzle.__drizzle_migrations')).rows[0].n;
    return counts;
  });
}

async function datasetDigests(url: string): Promise<{ id: string; digest: string }[]> {
  return withClient(url, async (client) => {
    const { rows } = await client.query<{ id: string; digest: string }>("select id, encode(sha256(bytes), 'hex') as digest from datasets order by id");
    return rows;
  });
}

describe('reliability: backup and restore with pg_dump and pg_restore', function () {
  this.timeout(240_000);
  let source: TestDatabase;
  let restored: TestDatabase;
  let app: AppOn;
  let ownerEmail: string;
  let revisionIds: string[] = [];
  const file = path.join(os.tmpdir(), `spreadproof-backup-${process.pid}-${randomBytes(4).toString('hex')}.dump`);

  before(async () => {
    source = await createTestDatabase();
    restored = await createTestDatabase({ migrate: false });
    app = openAppOn(source.url);
    const team = await teamOfRoles(app, 'Backup Bench');
    ownerEmail = team.users.owner.email;
    const { editor, owner, reviewer } = team.clients;
    for (let w = 0; w < 3; w++) {
      const sheet = await createBoreWorksheet(editor, team.teamId, boreDocument({ title: `Backed-up study ${w}` }));
      let base = sheet.revision.id;
      revisionIds.push(sheet.first, base);
      for (let r = 0; r < 3; r++) {
        const saved = await editor
          .post(`/api/worksheets/${sheet.worksheetId}/revisions`, { baseRevisionId: base, document: boreDocument({ title: `Backed-up study ${w}`, levels: [0.9 + r / 100] }) })
          .expect(201);
        base = saved.body.revision.id;
        revisionIds.push(base);
      }
      if (w === 0) {
        await owner.post(`/api/revisions/${base}/links`, {}).expect(201);
        await reviewer.post(`/api/revisions/${base}/reviews`, { verdict: 'approved', comment: 'Backed up and checked.' }).expect(201);
        const fork = await editor.post(`/api/revisions/${base}/fork`, { teamId: team.teamId, title: 'Forked before the backup' }).expect(201);
        revisionIds.push(fork.body.head.id);
      }
    }
    await editor.agent
      .post(`/api/teams/${team.teamId}/datasets`)
      .set('X-CSRF-Token', editor.token)
      .attach('file', Buffer.from('ring,deviation\nR1,2.1\nR2,1.9\nR3,2.3\nR4,2.0\n'), 'rings.csv')
      .expect(201);
  });

  after(async () => {
    await app?.close();
    await source?.drop();
    await restored?.drop();
    rmSync(file, { force: true });
  });

  it('writes a custom-format dump through the command line, by default under .data/backups/', async () => {
    const result = await cli(source.url, ['backup', file]);
    expect(result.code, result.output).to.equal(0);
    expect(result.output).to.match(/Backed up database/);
    expect(statSync(file).size).to.be.greaterThan(1000);
    expect(existsSync(`${file}.partial`)).to.equal(false);
    // The default name lies in .data/backups and names the database.
    const name = defaultBackupFile(source.url, new Date('2030-01-02T03:04:05.678Z'));
    expect(path.dirname(name)).to.equal(backupDir);
    expect(path.basename(name)).to.equal(`spreadproof-${source.name}-20300102T030405Z.dump`);
  });

  it('restores into an empty database with every revision, dataset and table row intact', async () => {
    const result = await cli(restored.url, ['restore', file]);
    expect(result.code, result.output).to.equal(0);

    const before = await storedRevisions(source.url);
    const after = await storedRevisions(restored.url);
    expect(before.length).to.equal(revisionIds.length);
    expect(after).to.deep.equal(before);
    for (const r of after) {
      expect(r.contentHashRecomputed, r.id).to.equal(r.contentHash);
      expect(r.resultsHashRecomputed, r.id).to.equal(r.resultsHash);
    }
    const digests = await datasetDigests(restored.url);
    expect(digests.length).to.equal(1);
    for (const d of digests) expect(d.digest).to.equal(d.id);
    expect(await tableCounts(restored.url)).to.deep.equal(await tableCounts(source.url));
  });

  it('keeps the immutability triggers in the restored database', async () => {
    await withClient(restored.url, async (client) => {
      let refused: Error | undefined;
      try {
        await client.query("update revisions set message = 'rewritten' where id = $1", [revisionIds[1]]);
      } catch (error) {
        refused = error as Error;
      }
      expect(refused, 'UPDATE of a revision must be refused').to.be.instanceOf(Error);
      refused = undefined;
      try {
        await client.query('delete from revisions where id = $1', [revisionIds[1]]);
      } catch (error) {
        refused = error as Error;
      }
      expect(refused, 'DELETE of a revision must be refused').to.be.instanceOf(Error);
    });
  });

  it('serves the restored copy: the same sign-in and the same revisions, hashes checked by the client', async () => {
    const copy = openAppOn(restored.url);
    try {
      const client = new Client(copy.app);
      await client.signIn(ownerEmail, testPassword);
      for (const id of revisionIds) {
        const res = await client.get(`/api/revisions/${id}`).expect(200);
        const recomputed = hashesOfAnswer(res.body.revision);
        expect(recomputed.contentHash, id).to.equal(res.body.revision.contentHash);
        expect(recomputed.resultsHash, id).to.equal(res.body.revision.resultsHash);
      }
    } finally {
      await copy.close();
    }
  });

  it('refuses to overwrite a database holding worksheets without --yes, and replaces it with --yes', async () => {
    const copy = openAppOn(restored.url);
    let extraId: string;
    try {
      const client = new Client(copy.app);
      await client.signIn(ownerEmail, testPassword);
      const { body } = await client.get('/api/teams').expect(200);
      const created = await client.post(`/api/teams/${body.teams[0].id}/worksheets`, { source: 'blank', title: 'Written after the backup' }).expect(201);
      extraId = created.body.worksheet.id;
    } finally {
      await copy.close();
    }
    const refused = await cli(restored.url, ['restore', file]);
    expect(refused.code).to.equal(1);
    expect(refused.output).to.match(/--yes/);
    const stillThere = await withClient(restored.url, (c) => c.query('select 1 from worksheets where id = $1', [extraId]));
    expect(stillThere.rowCount).to.equal(1);

    const replaced = await cli(restored.url, ['restore', file, '--yes']);
    expect(replaced.code, replaced.output).to.equal(0);
    const gone = await withClient(restored.url, (c) => c.query('select 1 from worksheets where id = $1', [extraId]));
    expect(gone.rowCount).to.equal(0);
    expect(await storedRevisions(restored.url)).to.deep.equal(await storedRevisions(source.url));
  });

  it('names the problem when the backup file does not exist', async () => {
    const result = await cli(restored.url, ['restore', path.join(os.tmpdir(), 'no-such-backup.dump'), '--yes']);
    expect(result.code).to.equal(1);
    expect(result.output).to.match(/no backup file at/i);
  });
});
