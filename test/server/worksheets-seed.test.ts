// The demo seed's worksheets: at least three realistic worksheets with several revisions each, a
// fork at another confidence level, review verdicts and a published link; idempotent.
import { expect } from 'chai';
import { count, eq, isNotNull } from 'drizzle-orm';
import supertest from 'supertest';
import { randomBytes } from 'node:crypto';
import { publishedLinks, reviews, revisions, worksheets } from '../../schema/index';
import { createApp } from '../../server/app';
import { openDatabase, type DatabaseHandle } from '../../server/db/client';
import { seedDemo } from '../../server/db/seed';
import { seedDemoWorksheets } from '../../server/seed/worksheets';
import { createTestDatabase, type TestDatabase } from '../support/db';

describe('demo seed: worksheets', function () {
  this.timeout(180_000);
  let database: TestDatabase;
  let handle: DatabaseHandle;
  const linkSecret = randomBytes(16).toString('hex');

  before(async () => {
    database = await createTestDatabase();
    handle = openDatabase(database.url, { max: 4 });
  });
  after(async () => {
    await handle?.close();
    await database?.drop();
  });

  it('adds the demo worksheets with their histories, a fork, verdicts and a published link', async () => {
    const people = await seedDemo(handle.db);
    const seeded = await seedDemoWorksheets(handle.db, people, { linkSecret });
    expect(seeded.created.length).to.be.at.least(4);
    expect(seeded.publishedPath).to.match(/^\/p\/[A-Za-z0-9_-]{43}$/);

    const rows = await handle.db
      .select({ id: worksheets.id, title: worksheets.title, origin: worksheets.originRevisionId, n: count(revisions.id) })
      .from(worksheets)
      .innerJoin(revisions, eq(revisions.worksheetId, worksheets.id))
      .where(eq(worksheets.teamId, people.teamId))
      .groupBy(worksheets.id);
    const originals = rows.filter((r) => r.origin === null);
    expect(originals.length).to.be.at.least(3);
    for (const r of originals) expect(r.n, `revisions of "${r.title}"`).to.be.at.least(3);
    const forks = rows.filter((r) => r.origin !== null);
    expect(forks.map((f) => f.title)).to.deep.equal(['Bore gauge BG-07 at 99 % confidence']);

    // Every stored revision evaluates without a failing step.
    const stored = await handle.db.select({ results: revisions.results, message: revisions.message }).from(revisions);
    for (const r of stored) {
      const failing = JSON.parse(r.results).steps.filter((s: { status: string }) => s.status !== 'ok');
      expect(failing.map((s: { stepId: string; error: unknown }) => [s.stepId, s.error]), r.message).to.deep.equal([]);
    }
    const verdicts = await handle.db.select({ verdict: reviews.verdict }).from(reviews);
    expect(verdicts.map((v) => v.verdict).sort()).to.deep.equal(['approved', 'changes_requested']);

    // The fork is at 99 %.
    const [fork] = await handle.db.select({ head: worksheets.headRevisionId }).from(worksheets).where(isNotNull(worksheets.originRevisionId));
    const [forkHead] = await handle.db.select({ content: revisions.content }).from(revisions).where(eq(revisions.id, fork.head!));
    const levels = JSON.parse(forkHead.content).steps.filter((s: { kind: string }) => s.kind === 'sigma-interval').map((s: { params: { levels: number[] } }) => s.params.levels);
    expect(levels).to.deep.equal([[0.99]]);

    // The printed link opens the published revision without sign-in.
    const app = createApp({ db: handle.db, pool: handle.pool, sessionSecret: 'seed-test' });
    const res = await supertest(app).get(`/api/public/${seeded.publishedPath!.slice(3)}`).expect(200);
    expect(res.body.title).to.equal('Bore gauge BG-07 repeatability qualification');
    expect(res.body.revision.number).to.equal(4);
  });

  it('changes nothing when run again', async () => {
    const before = await tableCounts(handle);
    const people = await seedDemo(handle.db);
    const again = await seedDemoWorksheets(handle.db, people, { linkSecret });
    expect(again.created).to.deep.equal([]);
    expect(again.publishedPath).to.match(/^\/p\//);
    expect(await tableCounts(handle)).to.deep.equal(before);
  });

  it('reports a revoked demo link instead of publishing it again', async () => {
    await handle.pool.query('update published_links set revoked_at = now()');
    const people = await seedDemo(handle.db);
    const again = await seedDemoWorksheets(handle.db, people, { linkSecret });
    expect(again.publishedPath).to.equal(null);
    const [{ n }] = await handle.db.select({ n: count() }).from(publishedLinks);
    expect(n).to.equal(1);
  });
});

async function tableCounts(handle: DatabaseHandle): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const table of ['worksheets', 'revisions', 'datasets', 'team_datasets', 'published_links', 'reviews', 'review_requests', 'audit_events']) {
    const { rows } = await handle.pool.query(`select count(*)::int as n from ${table}`);
    out[table] = rows[0].n;
  }
  return out;
}
