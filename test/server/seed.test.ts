import { expect } from 'chai';
import { eq } from 'drizzle-orm';
import { memberships, teams, users } from '../../schema/index';
import { verifyPassword } from '../../server/auth/password';
import { openDatabase, type DatabaseHandle } from '../../server/db/client';
import { demoPassword, demoUsers, seedDemo } from '../../server/db/seed';
import { createTestDatabase, type TestDatabase } from '../support/db';

describe('demo seed', function () {
  this.timeout(30_000);
  let database: TestDatabase;
  let handle: DatabaseHandle;
  before(async () => {
    database = await createTestDatabase();
    handle = openDatabase(database.url, { max: 2 });
  });
  after(async () => {
    await handle?.close();
    await database?.drop();
  });

  it('creates the four demo users in one team with the roles of contracts.md', async () => {
    const seed = await seedDemo(handle.db);
    const rows = await handle.db
      .select({ email: users.email, role: memberships.role, team: teams.name })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .innerJoin(teams, eq(teams.id, memberships.teamId))
      .where(eq(memberships.teamId, seed.teamId));
    expect(Object.fromEntries(rows.map((r) => [r.email, r.role]))).to.deep.equal({
      'ines.okafor@harrowvale.test': 'owner',
      'tomas.lindqvist@harrowvale.test': 'editor',
      'priya.raman@harrowvale.test': 'reviewer',
      'marc.delaunay@harrowvale.test': 'viewer',
    });
    expect(new Set(rows.map((r) => r.team))).to.deep.equal(new Set(['Metrology Lab']));
    const [ines] = await handle.db.select().from(users).where(eq(users.email, demoUsers[0].email));
    expect(await verifyPassword(demoPassword, ines.passwordHash)).to.equal(true);
  });

  it('is idempotent and keeps changes made since', async () => {
    const first = await seedDemo(handle.db);
    await handle.db
      .update(memberships)
      .set({ role: 'editor' })
      .where(eq(memberships.userId, first.userIds['marc.delaunay@harrowvale.test']));
    const second = await seedDemo(handle.db);
    expect(second).to.deep.equal(first);
    expect(await handle.db.select().from(teams)).to.have.length(1);
    expect(await handle.db.select().from(users)).to.have.length(4);
    const [marc] = await handle.db
      .select({ role: memberships.role })
      .from(memberships)
      .where(eq(memberships.userId, first.userIds['marc.delaunay@harrowvale.test']));
    expect(marc.role).to.equal('editor');
  });
});
