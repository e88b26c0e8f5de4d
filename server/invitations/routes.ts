/**
 * Invitations by e-mail. An owner invites an address with a role; the address receives a link with
 * a single-use token that expires (only its hash is stored). A person without an account signs up
 * from the link and is a member at once; a person with an account signs in and accepts. Owners see
 * the open invitations of their team and can withdraw them; inviting an address again replaces its
 * open invitation (the earlier link stops working).
 */
import { and, desc, eq, gt, isNull, sql } from 'drizzle-orm';
import { z } from 'zod';
import {
  createInvitationRequest,
  invitationSignupRequest,
  invitationTokenRequest,
  type InvitationPreview,
  type TeamInvitation,
} from '@shared/api/account';
import type { TeamRole } from '@shared/api/teams';
import { invitations, memberships, teams, users, type InvitationRow } from '../../schema/index';
import { hashPassword } from '../auth/password';
import { publicUser } from '../auth/passport';
import type { Database, Transaction } from '../db/client';
import { conflict, HttpError, notFound } from '../http/errors';
import { ApiRouter, publicRoute, requireTeamRole, signedIn, type RouterDeps } from '../http/route';
import { byAddress, byUser, mailRateLimiter } from '../mail/rate-limit';
import type { MailService } from '../mail/service';
import { logIn } from '../mail/session';
import { invitationMail } from '../mail/templates';
import { hashToken, newToken } from '../mail/tokens';
import { notify } from '../notifications/notify';

const teamParams = z.object({ teamId: z.uuid() });
const invitationParams = z.object({ teamId: z.uuid(), invitationId: z.uuid() });

const isUniqueViolation = (error: unknown) =>
  (error as { code?: string }).code === '23505' || (error as { cause?: { code?: string } }).cause?.code === '23505';

type InvitationListRow = Pick<InvitationRow, 'id' | 'email' | 'role' | 'createdAt' | 'expiresAt'> & {
  inviterId: string | null;
  inviterName: string | null;
};

function toTeamInvitation(row: InvitationListRow, now = new Date()): TeamInvitation {
  return {
    id: row.id,
    email: row.email,
    role: row.role,
    invitedBy: row.inviterId && row.inviterName ? { id: row.inviterId, name: row.inviterName } : null,
    createdAt: row.createdAt.toISOString(),
    expiresAt: row.expiresAt.toISOString(),
    status: row.expiresAt.getTime() > now.getTime() ? 'pending' : 'expired',
  };
}

const openInvitation = and(isNull(invitations.acceptedAt), isNull(invitations.withdrawnAt));

async function openInvitations(db: Database, teamId: string, id?: string): Promise<TeamInvitation[]> {
  const rows = await db
    .select({
      id: invitations.id,
      email: invitations.email,
      role: invitations.role,
      createdAt: invitations.createdAt,
      expiresAt: invitations.expiresAt,
      inviterId: users.id,
      inviterName: users.name,
    })
    .from(invitations)
    .leftJoin(users, eq(users.id, invitations.invitedBy))
    .where(and(eq(invitations.teamId, teamId), openInvitation, id ? eq(invitations.id, id) : undefined))
    .orderBy(desc(invitations.createdAt));
  return rows.map((row) => toTeamInvitation(row));
}

const linkProblem = {
  unknown: () =>
    new HttpError(404, 'invitation_not_found', 'This invitation link is not known. Check that the whole link was opened, or ask for a new invitation.'),
  expired: () =>
    new HttpError(410, 'invitation_expired', 'This invitation has expired. Ask an owner of the team to invite you again.'),
  withdrawn: () =>
    new HttpError(410, 'invitation_withdrawn', 'This invitation was withdrawn or replaced by a newer one. Use the link in the latest invitation.'),
  used: () => new HttpError(410, 'invitation_used', 'This invitation has already been accepted. Sign in to open the team.'),
};

interface FoundInvitation {
  row: InvitationRow;
  teamName: string;
  invitedByName: string | null;
}

/** The invitation a token names, if it can still be accepted; otherwise the reason it cannot. */
async function usableInvitation(db: Database | Transaction, token: string): Promise<FoundInvitation> {
  const [found] = await db
    .select({ row: invitations, teamName: teams.name, invitedByName: users.name })
    .from(invitations)
    .innerJoin(teams, eq(teams.id, invitations.teamId))
    .leftJoin(users, eq(users.id, invitations.invitedBy))
    .where(eq(invitations.tokenHash, hashToken(token)));
  if (!found) throw linkProblem.unknown();
  if (found.row.acceptedAt) throw linkProblem.used();
  if (found.row.withdrawnAt) throw linkProblem.withdrawn();
  if (found.row.expiresAt.getTime() <= Date.now()) throw linkProblem.expired();
  return found;
}

/**
 * Marks the invitation accepted by `userId` and makes the user a member, in the caller's
 * transaction. The conditional update is what makes a link single-use under concurrent requests.
 */
async function claim(tx: Transaction, invitationId: string, userId: string): Promise<InvitationRow> {
  const [claimed] = await tx
    .update(invitations)
    .set({ acceptedAt: sql`now()`, acceptedBy: userId })
    .where(and(eq(invitations.id, invitationId), openInvitation, gt(invitations.expiresAt, sql`now()`)))
    .returning();
  if (!claimed) throw linkProblem.used();
  return claimed;
}

async function join(tx: Transaction, invitation: InvitationRow, userId: string): Promise<TeamRole> {
  const inserted = await tx
    .insert(memberships)
    .values({ teamId: invitation.teamId, userId, role: invitation.role })
    .onConflictDoNothing()
    .returning({ role: memberships.role });
  if (inserted.length > 0) return inserted[0].role;
  // Already a member (added by hand meanwhile): keep the role the owners gave.
  const [existing] = await tx
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.teamId, invitation.teamId), eq(memberships.userId, userId)));
  return existing.role;
}

export function invitationRoutes(deps: RouterDeps & { mail: MailService }): ApiRouter[] {
  const { mail } = deps;
  const inviteLimiter = mailRateLimiter(mail.limits.invitationsPerUser, byUser, 'invitations', deps.rateLimitStores?.('invitations-per-user'));
  const tokenLimiter = mailRateLimiter(
    mail.limits.tokenUsePerAddress,
    byAddress,
    'attempts with invitation links',
    deps.rateLimitStores?.('invitation-links-per-address'),
  );

  const byTeam = new ApiRouter('/api/teams/:teamId/invitations', deps)
    .get(
      '/',
      { access: requireTeamRole('owner'), summary: 'Open invitations of a team', params: teamParams },
      async ({ res, db, team }) => {
        res.json({ items: await openInvitations(db, team.id) });
      },
    )
    .post(
      '/',
      {
        access: requireTeamRole('owner'),
        summary: 'Invite an e-mail address to the team with a role (sends the invitation)',
        params: teamParams,
        body: createInvitationRequest,
        before: [inviteLimiter],
      },
      async ({ res, db, user, team, body }) => {
        const [existing] = await db.select({ id: users.id }).from(users).where(eq(users.email, body.email));
        if (existing) {
          const [member] = await db
            .select({ role: memberships.role })
            .from(memberships)
            .where(and(eq(memberships.teamId, team.id), eq(memberships.userId, existing.id)));
          if (member) {
            throw new HttpError(409, 'already_member', `This person is already a member of the team (${member.role}).`, [
              { field: 'email', message: 'Already a member of this team.' },
            ]);
          }
        }
        const [teamRow] = await db.select({ name: teams.name }).from(teams).where(eq(teams.id, team.id));
        const { token, hash } = newToken();
        const expiresAt = new Date(Date.now() + mail.invitationTtlMs);
        const content = invitationMail({
          baseUrl: mail.baseUrl,
          link: mail.link(`/invitation#${token}`),
          teamName: teamRow.name,
          role: body.role,
          invitedByName: user.name,
          expiresAt,
          accountExists: Boolean(existing),
        });
        let id: string;
        try {
          id = await db.transaction(async (tx) => {
            // Inviting an address again replaces its open invitation: only the newest link works.
            await tx
              .update(invitations)
              .set({ withdrawnAt: sql`now()` })
              .where(and(eq(invitations.teamId, team.id), eq(invitations.email, body.email), openInvitation));
            const [row] = await tx
              .insert(invitations)
              .values({ teamId: team.id, email: body.email, role: body.role, tokenHash: hash, invitedBy: user.id, expiresAt })
              .returning({ id: invitations.id });
            await mail.enqueueIn(tx, { kind: 'invitation', to: body.email, recipientUserId: existing?.id ?? null, ...content });
            return row.id;
          });
        } catch (error) {
          if (isUniqueViolation(error)) throw conflict('invitation_conflict', 'Another invitation to this address was sent at the same moment. Reload the list.');
          throw error;
        }
        mail.wake();
        const [invitation] = await openInvitations(db, team.id, id);
        res.status(201).json({ invitation });
      },
    )
    .delete(
      '/:invitationId',
      { access: requireTeamRole('owner'), summary: 'Withdraw an open invitation (its link stops working)', params: invitationParams },
      async ({ res, db, team, params }) => {
        const withdrawn = await db
          .update(invitations)
          .set({ withdrawnAt: sql`now()` })
          .where(and(eq(invitations.id, params.invitationId), eq(invitations.teamId, team.id), openInvitation))
          .returning({ id: invitations.id });
        if (withdrawn.length === 0) throw notFound('There is no open invitation with this id in the team.');
        res.status(204).end();
      },
    );

  const byToken = new ApiRouter('/api/invitations', deps)
    .post(
      '/lookup',
      {
        access: publicRoute,
        summary: 'What an invitation link is for (team, role, address), before accepting it',
        body: invitationTokenRequest,
        before: [tokenLimiter],
      },
      async ({ res, db, body }) => {
        const found = await usableInvitation(db, body.token);
        const [account] = await db.select({ id: users.id }).from(users).where(eq(users.email, found.row.email));
        const invitation: InvitationPreview = {
          teamName: found.teamName,
          role: found.row.role,
          email: found.row.email,
          invitedByName: found.invitedByName,
          expiresAt: found.row.expiresAt.toISOString(),
          accountExists: Boolean(account),
        };
        res.json({ invitation });
      },
    )
    .post(
      '/accept',
      {
        access: signedIn,
        summary: 'Accept an invitation as the signed-in user (the invited address)',
        body: invitationTokenRequest,
        before: [tokenLimiter],
      },
      async ({ res, db, user, body }) => {
        const found = await usableInvitation(db, body.token);
        if (found.row.email !== user.email.toLowerCase()) {
          throw new HttpError(
            403,
            'invitation_other_address',
            `This invitation was sent to ${found.row.email}, and you are signed in as ${user.email}. Sign in with the invited address to accept it.`,
          );
        }
        const { invitation, role } = await db.transaction(async (tx) => {
          const claimed = await claim(tx, found.row.id, user.id);
          return { invitation: claimed, role: await join(tx, claimed, user.id) };
        });
        notify(mail, 'invitation_accepted', {
          invitationId: invitation.id,
          teamId: invitation.teamId,
          invitedBy: invitation.invitedBy,
          memberId: user.id,
          role,
        });
        res.json({ team: { id: invitation.teamId, name: found.teamName, role } });
      },
    )
    .post(
      '/signup',
      {
        access: publicRoute,
        summary: 'Create an account for the invited address from the link, sign in and join the team',
        body: invitationSignupRequest,
        before: [tokenLimiter],
      },
      async ({ req, res, db, log, body }) => {
        const found = await usableInvitation(db, body.token);
        const passwordHash = await hashPassword(body.password);
        let created: { id: string; name: string; email: string };
        let role: TeamRole;
        try {
          ({ created, role } = await db.transaction(async (tx) => {
            const [row] = await tx
              .insert(users)
              .values({ name: body.name, email: found.row.email, passwordHash })
              .returning({ id: users.id, name: users.name, email: users.email });
            const claimed = await claim(tx, found.row.id, row.id);
            return { created: row, role: await join(tx, claimed, row.id) };
          }));
        } catch (error) {
          if (isUniqueViolation(error)) {
            throw new HttpError(409, 'email_taken', `An account with ${found.row.email} exists already. Sign in with it to accept the invitation.`);
          }
          throw error;
        }
        const user = publicUser(created);
        await logIn(req, user);
        log.info({ userId: user.id, teamId: found.row.teamId }, 'account created from an invitation');
        notify(mail, 'invitation_accepted', {
          invitationId: found.row.id,
          teamId: found.row.teamId,
          invitedBy: found.row.invitedBy,
          memberId: user.id,
          role,
        });
        res.status(201).json({ user, team: { id: found.row.teamId, name: found.teamName, role } });
      },
    );

  return [byTeam, byToken];
}
