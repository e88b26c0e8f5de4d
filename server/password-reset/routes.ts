/**
 * Password reset by mail. Asking for a link answers the same, at once, whether or not the address
 * has an account: the lookup and the message happen after the answer has gone. The link carries a
 * single-use token that expires (only its hash is stored); a newer link voids the older ones.
 * Setting the new password signs the person in here and ends every other session of the account.
 */
import { and, eq, gt, isNull, sql } from 'drizzle-orm';
import {
  passwordResetCompleteRequest,
  passwordResetRequest,
  passwordResetRequestedMessage,
  passwordResetTokenRequest,
} from '@shared/api/account';
import { passwordResets, users } from '../../schema/index';
import { hashPassword } from '../auth/password';
import { publicUser } from '../auth/passport';
import type { Database } from '../db/client';
import { HttpError } from '../http/errors';
import { ApiRouter, publicRoute, type RouterDeps } from '../http/route';
import { byAddress, byBodyEmail, mailRateLimiter } from '../mail/rate-limit';
import type { MailService } from '../mail/service';
import { endOtherSessions, logIn } from '../mail/session';
import { passwordResetMail } from '../mail/templates';
import { hashToken, newToken } from '../mail/tokens';

const badLink = () =>
  new HttpError(
    410,
    'reset_link_invalid',
    'This link to choose a new password has expired, was used already, or was replaced by a newer one. Ask for a new link.',
  );

/** The reset a token names, if it is still usable. Unknown, used and expired links answer alike. */
async function usableReset(db: Database, token: string) {
  const [row] = await db
    .select({ id: passwordResets.id, userId: passwordResets.userId, expiresAt: passwordResets.expiresAt, email: users.email })
    .from(passwordResets)
    .innerJoin(users, eq(users.id, passwordResets.userId))
    .where(
      and(eq(passwordResets.tokenHash, hashToken(token)), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, sql`now()`)),
    );
  if (!row) throw badLink();
  return row;
}

/** Creates the reset and queues its message; runs after the answer, so it cannot show in timing. */
async function sendResetLink(mail: MailService, email: string): Promise<void> {
  const { db } = mail;
  const [user] = await db.select({ id: users.id, email: users.email }).from(users).where(eq(users.email, email));
  if (!user) return;
  const { token, hash } = newToken();
  const expiresAt = new Date(Date.now() + mail.resetTtlMs);
  const content = passwordResetMail({
    baseUrl: mail.baseUrl,
    link: mail.link(`/account/new-password#${token}`),
    email: user.email,
    expiresAt,
  });
  await db.transaction(async (tx) => {
    // Only the newest link works.
    await tx
      .update(passwordResets)
      .set({ usedAt: sql`now()` })
      .where(and(eq(passwordResets.userId, user.id), isNull(passwordResets.usedAt)));
    await tx.insert(passwordResets).values({ userId: user.id, tokenHash: hash, expiresAt });
    await mail.enqueueIn(tx, { kind: 'password_reset', to: user.email, recipientUserId: user.id, ...content });
  });
  mail.wake();
}

export function passwordResetRoutes(deps: RouterDeps & { mail: MailService }): ApiRouter {
  const { mail } = deps;
  const stores = deps.rateLimitStores;
  const perAddress = mailRateLimiter(mail.limits.resetPerAddress, byAddress, 'password-reset requests', stores?.('reset-requests-per-address'));
  const perEmail = mailRateLimiter(
    mail.limits.resetPerEmail,
    byBodyEmail,
    'password-reset requests for this address',
    stores?.('reset-requests-per-email'),
  );
  const tokenLimiter = mailRateLimiter(
    mail.limits.tokenUsePerAddress,
    byAddress,
    'attempts with password-reset links',
    stores?.('reset-links-per-address'),
  );

  return new ApiRouter('/api/password-reset', deps)
    .post(
      '/request',
      {
        access: publicRoute,
        summary: 'Mail a link to choose a new password (same answer whether or not the address has an account)',
        body: passwordResetRequest,
        before: [perAddress, perEmail],
      },
      ({ res, body }) => {
        res.status(202).json({ message: passwordResetRequestedMessage });
        mail.background('password reset request', () => sendResetLink(mail, body.email));
      },
    )
    .post(
      '/check',
      { access: publicRoute, summary: 'Whether a password-reset link still works (and for which address)', body: passwordResetTokenRequest, before: [tokenLimiter] },
      async ({ res, db, body }) => {
        const reset = await usableReset(db, body.token);
        res.json({ email: reset.email, expiresAt: reset.expiresAt.toISOString() });
      },
    )
    .post(
      '/complete',
      {
        access: publicRoute,
        summary: 'Set a new password from a reset link; signs in here and ends every other session',
        body: passwordResetCompleteRequest,
        before: [tokenLimiter],
      },
      async ({ req, res, db, log, body }) => {
        const reset = await usableReset(db, body.token);
        const passwordHash = await hashPassword(body.password);
        const user = await db.transaction(async (tx) => {
          // The conditional update makes the link single-use even under concurrent requests.
          const [used] = await tx
            .update(passwordResets)
            .set({ usedAt: sql`now()` })
            .where(and(eq(passwordResets.id, reset.id), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, sql`now()`)))
            .returning({ id: passwordResets.id });
          if (!used) throw badLink();
          // Every other outstanding link of the account is void too.
          await tx
            .update(passwordResets)
            .set({ usedAt: sql`now()` })
            .where(and(eq(passwordResets.userId, reset.userId), isNull(passwordResets.usedAt)));
          const [row] = await tx
            .update(users)
            .set({ passwordHash })
            .where(eq(users.id, reset.userId))
            .returning({ id: users.id, name: users.name, email: users.email });
          return publicUser(row);
        });
        await logIn(req, user);
        const ended = await endOtherSessions(db, user.id, req.sessionID);
        log.info({ userId: user.id, sessionsEnded: ended }, 'password reset');
        res.json({ user });
      },
    );
}
