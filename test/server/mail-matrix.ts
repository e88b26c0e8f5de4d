/**
 * The mail-backed flows' part of the route × role authorization matrix
 * (test/server/authorization-matrix.test.ts): for every fixture team, an open invitation (to
 * withdraw), one invitation per signed-in caller's own address (to accept), one for an address
 * without an account (to sign up from), and a password-reset link of the team's target user.
 *
 * Owners manage invitations; the token routes are public (the link is the credential) except
 * accepting, which needs the invited account signed in. The matrix app has no local mail server,
 * so the development mailbox answers 404 to everyone signed in; test/server/mail.test.ts covers
 * site admins and the rest.
 */
import { randomUUID } from 'node:crypto';
import { invitations, passwordResets } from '../../schema/index';
import type { Database } from '../../server/db/client';
import { newToken } from '../../server/mail/tokens';
import { testPassword, uniqueEmail } from './support';
import { anySignedIn, everyone, teamAtLeast, type Caller, type SignedInCaller, type Statuses } from './matrix-statuses';


export interface MailMatrixValues {
  invitationId: string;
  /** Invitations to each signed-in caller's own address. */
  acceptTokens: Record<SignedInCaller, string>;
  /** An invitation to an address without an account. */
  signupToken: string;
  resetToken: string;
  messageId: string;
}

interface MatrixFixture {
  teamId: string;
  targetUserId: string;
  emails: Record<SignedInCaller, string>;
  mail?: MailMatrixValues;
}

interface MatrixExpectation {
  body?: (fixture: MatrixFixture, caller: Caller) => object;
  expect: Statuses;
}


const values = (f: MatrixFixture) => f.mail!;

export const mailExpectations: Record<string, MatrixExpectation> = {
  'GET /api/teams/:teamId/invitations': { expect: teamAtLeast('owner', 200) },
  'POST /api/teams/:teamId/invitations': {
    body: () => ({ email: uniqueEmail('matrix-invitee'), role: 'viewer' }),
    expect: teamAtLeast('owner', 201),
  },
  'DELETE /api/teams/:teamId/invitations/:invitationId': { expect: teamAtLeast('owner', 204) },
  'POST /api/invitations/lookup': { body: (f) => ({ token: values(f).signupToken }), expect: everyone(200) },
  'POST /api/invitations/accept': {
    body: (f, caller) => ({ token: values(f).acceptTokens[caller === 'signed-out' ? 'viewer' : caller] }),
    expect: anySignedIn(200),
  },
  'POST /api/invitations/signup': {
    body: (f) => ({ token: values(f).signupToken, name: 'Matrix Invitee', password: testPassword }),
    expect: everyone(201),
  },
  'POST /api/password-reset/request': { body: () => ({ email: uniqueEmail('matrix-reset') }), expect: everyone(202) },
  'POST /api/password-reset/check': { body: (f) => ({ token: values(f).resetToken }), expect: everyone(200) },
  'POST /api/password-reset/complete': {
    body: (f) => ({ token: values(f).resetToken, password: 'a new matrix passphrase' }),
    expect: everyone(200),
  },
  'GET /api/account': { expect: anySignedIn(200) },
  'GET /api/account/notifications': { expect: anySignedIn(200) },
  'PATCH /api/account/notifications': { body: () => ({ review_verdict: false }), expect: anySignedIn(200) },
  'GET /api/dev/mailbox': { expect: anySignedIn(404) },
  'GET /api/dev/mailbox/:messageId': { expect: anySignedIn(404) },
  'DELETE /api/dev/mailbox': { expect: anySignedIn(404) },
};

export async function addMailFixture(db: Database, fixture: MatrixFixture): Promise<MailMatrixValues> {
  const expiresAt = new Date(Date.now() + 60 * 60 * 1000);
  const invite = async (email: string) => {
    const { token, hash } = newToken();
    const [row] = await db
      .insert(invitations)
      .values({ teamId: fixture.teamId, email, role: 'viewer', tokenHash: hash, expiresAt })
      .returning({ id: invitations.id });
    return { id: row.id, token };
  };
  const pending = await invite(uniqueEmail('matrix-pending'));
  const signup = await invite(uniqueEmail('matrix-signup'));
  const acceptTokens = {} as Record<SignedInCaller, string>;
  for (const [caller, email] of Object.entries(fixture.emails) as Array<[SignedInCaller, string]>) {
    acceptTokens[caller] = (await invite(email)).token;
  }
  const reset = newToken();
  await db.insert(passwordResets).values({ userId: fixture.targetUserId, tokenHash: reset.hash, expiresAt });
  return { invitationId: pending.id, acceptTokens, signupToken: signup.token, resetToken: reset.token, messageId: randomUUID() };
}

export function mailPathValues(v: MailMatrixValues): Record<string, string> {
  return { invitationId: v.invitationId, messageId: v.messageId };
}
