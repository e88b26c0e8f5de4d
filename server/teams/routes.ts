import { and, asc, count, eq } from 'drizzle-orm';
import { z } from 'zod';
import { addMemberRequest, changeRoleRequest, createTeamRequest, teamRoles, type TeamMember } from '@shared/api/teams';
import { memberships, teams, users } from '../../schema/index';
import type { Database, Transaction } from '../db/client';
import { conflict, HttpError, notFound } from '../http/errors';
import { ApiRouter, requireTeamRole, signedIn, type RouterDeps } from '../http/route';

const teamParams = z.object({ teamId: z.uuid() });
const memberParams = z.object({ teamId: z.uuid(), userId: z.uuid() });

const roleOrder = (role: string) => teamRoles.indexOf(role as (typeof teamRoles)[number]);

async function listMembers(db: Database | Transaction, teamId: string): Promise<TeamMember[]> {
  const rows = await db
    .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.teamId, teamId))
    .orderBy(asc(users.name), asc(users.email));
  return rows.sort((a, b) => roleOrder(a.role) - roleOrder(b.role));
}

async function findMember(db: Database | Transaction, teamId: string, userId: string): Promise<TeamMember | null> {
  const [row] = await db
    .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.teamId, teamId), eq(memberships.userId, userId)));
  return row ?? null;
}

/**
 * Locks the team row so that concurrent role changes are serialised, then counts its owners:
 * without the lock two owners could demote each other at once and leave the team ownerless.
 */
async function lockAndCountOwners(tx: Transaction, teamId: string): Promise<number> {
  await tx.select({ id: teams.id }).from(teams).where(eq(teams.id, teamId)).for('update');
  const [row] = await tx
    .select({ owners: count() })
    .from(memberships)
    .where(and(eq(memberships.teamId, teamId), eq(memberships.role, 'owner')));
  return row.owners;
}

const lastOwner = () =>
  conflict('last_owner', 'A team needs at least one owner. Make another member an owner first.');

export function teamRoutes(deps: RouterDeps): ApiRouter {
  return new ApiRouter('/api/teams', deps)
    .get('/', { access: signedIn, summary: 'Teams I belong to, with my role' }, async ({ res, db, user }) => {
      const rows = await db
        .select({ id: teams.id, name: teams.name, role: memberships.role })
        .from(memberships)
        .innerJoin(teams, eq(teams.id, memberships.teamId))
        .where(eq(memberships.userId, user.id))
        .orderBy(asc(teams.name), asc(teams.id));
      res.json({ teams: rows });
    })
    .post(
      '/',
      { access: signedIn, summary: 'Create a team; I become its owner', body: createTeamRequest },
      async ({ res, db, user, body }) => {
        const team = await db.transaction(async (tx) => {
          const [created] = await tx.insert(teams).values({ name: body.name }).returning({ id: teams.id, name: teams.name });
          await tx.insert(memberships).values({ teamId: created.id, userId: user.id, role: 'owner' });
          return created;
        });
        res.status(201).json({ team: { ...team, role: 'owner' } });
      },
    )
    .get(
      '/:teamId',
      { access: requireTeamRole('viewer'), summary: 'A team, my role and its members', params: teamParams },
      async ({ res, db, team }) => {
        const [row] = await db.select({ id: teams.id, name: teams.name }).from(teams).where(eq(teams.id, team.id));
        if (!row) throw notFound();
        res.json({ team: row, myRole: team.role, members: await listMembers(db, team.id) });
      },
    )
    .post(
      '/:teamId/members',
      {
        access: requireTeamRole('owner'),
        summary: 'Add an existing user by e-mail with a role',
        params: teamParams,
        body: addMemberRequest,
      },
      async ({ res, db, team, body }) => {
        const [person] = await db.select({ id: users.id }).from(users).where(eq(users.email, body.email));
        if (!person) {
          throw new HttpError(404, 'user_not_found', 'No account uses this e-mail address. Ask the person to sign up first.', [
            { field: 'email', message: 'No account uses this e-mail address.' },
          ]);
        }
        const inserted = await db
          .insert(memberships)
          .values({ teamId: team.id, userId: person.id, role: body.role })
          .onConflictDoNothing()
          .returning({ userId: memberships.userId });
        if (inserted.length === 0) throw conflict('already_member', 'This person is already a member of the team.');
        res.status(201).json({ member: await findMember(db, team.id, person.id) });
      },
    )
    .patch(
      '/:teamId/members/:userId',
      { access: requireTeamRole('owner'), summary: "Change a member's role", params: memberParams, body: changeRoleRequest },
      async ({ res, db, team, params, body }) => {
        const member = await db.transaction(async (tx) => {
          const owners = await lockAndCountOwners(tx, team.id);
          const current = await findMember(tx, team.id, params.userId);
          if (!current) throw notFound('This person is not a member of the team.');
          if (current.role === 'owner' && body.role !== 'owner' && owners <= 1) throw lastOwner();
          await tx
            .update(memberships)
            .set({ role: body.role })
            .where(and(eq(memberships.teamId, team.id), eq(memberships.userId, params.userId)));
          return { ...current, role: body.role };
        });
        res.json({ member });
      },
    )
    .delete(
      '/:teamId/members/:userId',
      { access: requireTeamRole('owner'), summary: 'Remove a member', params: memberParams },
      async ({ res, db, team, params }) => {
        await db.transaction(async (tx) => {
          const owners = await lockAndCountOwners(tx, team.id);
          const current = await findMember(tx, team.id, params.userId);
          if (!current) throw notFound('This person is not a member of the team.');
          if (current.role === 'owner' && owners <= 1) throw lastOwner();
          await tx
            .delete(memberships)
            .where(and(eq(memberships.teamId, team.id), eq(memberships.userId, params.userId)));
        });
        res.status(204).end();
      },
    );
}
