/**
 * The demo, in an invented scenario: the metrology lab of the invented company Harrow Vale
 * Precision. Idempotent: rows that exist are left as they are (so a second start keeps every change
 * made through the app), missing ones are added. Later features append their own seed steps here.
 */
import { and, eq, inArray } from 'drizzle-orm';
import type { TeamRole } from '@shared/api/teams';
import { memberships, teams, users } from '../../schema/index';
import { hashPassword } from '../auth/password';
import type { Database } from './client';

export const demoPassword = 'spreadproof-demo';
export const demoTeamName = 'Metrology Lab';
export const demoCompany = 'Harrow Vale Precision';

export const demoUsers: ReadonlyArray<{ name: string; email: string; role: TeamRole; part: string }> = [
  { name: 'Ines Okafor', email: 'ines.okafor@harrowvale.test', role: 'owner', part: 'the analyst' },
  { name: 'Tomas Lindqvist', email: 'tomas.lindqvist@harrowvale.test', role: 'editor', part: 'the colleague' },
  { name: 'Priya Raman', email: 'priya.raman@harrowvale.test', role: 'reviewer', part: 'the reviewer' },
  { name: 'Marc Delaunay', email: 'marc.delaunay@harrowvale.test', role: 'viewer', part: 'a viewer' },
];

export interface DemoSeed {
  teamId: string;
  userIds: Record<string, string>;
}

export async function seedDemo(db: Database): Promise<DemoSeed> {
  const emails = demoUsers.map((u) => u.email);
  const existing = await db.select({ id: users.id, email: users.email }).from(users).where(inArray(users.email, emails));
  const userIds: Record<string, string> = Object.fromEntries(existing.map((u) => [u.email, u.id]));

  for (const person of demoUsers) {
    if (userIds[person.email]) continue;
    const [row] = await db
      .insert(users)
      .values({ name: person.name, email: person.email, passwordHash: await hashPassword(demoPassword) })
      .onConflictDoNothing()
      .returning({ id: users.id });
    userIds[person.email] =
      row?.id ?? (await db.select({ id: users.id }).from(users).where(eq(users.email, person.email)))[0].id;
  }

  // The demo team is the one named "Metrology Lab" that the analyst owns.
  const owner = demoUsers.find((u) => u.role === 'owner')!;
  const [found] = await db
    .select({ id: teams.id })
    .from(teams)
    .innerJoin(memberships, eq(memberships.teamId, teams.id))
    .where(and(eq(teams.name, demoTeamName), eq(memberships.userId, userIds[owner.email]), eq(memberships.role, 'owner')))
    .limit(1);
  let teamId = found?.id;
  if (!teamId) {
    teamId = await db.transaction(async (tx) => {
      const [team] = await tx.insert(teams).values({ name: demoTeamName }).returning({ id: teams.id });
      await tx
        .insert(memberships)
        .values(demoUsers.map((person) => ({ teamId: team.id, userId: userIds[person.email], role: person.role })));
      return team.id;
    });
  }
  return { teamId, userIds };
}
