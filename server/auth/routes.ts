import type { Request, RequestHandler, Response } from 'express';
import rateLimit, { ipKeyGenerator, type Store } from 'express-rate-limit';
import type passport from 'passport';
import { signinRequest, signupRequest, type User } from '@shared/api/auth';
import { sha256Hex } from '@shared/engine/hash';
import { users } from '../../schema/index';
import { HttpError, sendError } from '../http/errors';
import { failureLimiter } from '../http/failure-limiter';
import { ApiRouter, publicRoute, type RouterDeps } from '../http/route';
import { csrfToken } from './csrf';
import { hashPassword } from './password';
import { publicUser } from './passport';

export interface AuthRateLimit {
  windowMs: number;
  /** Failed sign-ins per client address and account (× ADDRESS_FACTOR per address alone), or sign-ups per address, within the window. */
  limit: number;
}

export const defaultAuthRateLimit: AuthRateLimit = { windowMs: 15 * 60 * 1000, limit: 10 };

/**
 * Failed sign-ins are counted per client address and account together (OWASP Authentication
 * Cheat Sheet: throttle per account as well as per source), so that colleagues behind one
 * office address are not locked out by one person's typos; a looser count per address alone
 * (ADDRESS_FACTOR × the limit) still stops one source from trying many accounts. The account
 * enters the key as a hash of the lower-cased e-mail, never as the address itself.
 */
export const ADDRESS_FACTOR = 10;

function accountKey(req: Request): string {
  const email = typeof req.body?.email === 'string' ? req.body.email.trim().toLowerCase() : '';
  return `${ipKeyGenerator(req.ip ?? '0.0.0.0')}|${sha256Hex(email).slice(0, 32)}`;
}

function limitMessage(windowMs: number): HttpError {
  const minutes = Math.max(1, Math.ceil(windowMs / 60000));
  return new HttpError(429, 'rate_limited', `Too many attempts. Wait ${minutes} minute${minutes === 1 ? '' : 's'} and try again.`);
}

/** Sign-ups: every attempt counts, per client address. */
function signupLimit(options: AuthRateLimit, store?: Store): RequestHandler {
  return rateLimit({
    store,
    windowMs: options.windowMs,
    limit: options.limit,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    handler: (_req, res, _next, used) => sendError(res, limitMessage(used.windowMs)),
  });
}

/** Sign-ins: failures count (on arrival; successes are taken back before the answer leaves). */
function signinLimit(options: AuthRateLimit, store: Store | undefined, key?: (req: Request) => string): RequestHandler {
  return failureLimiter({
    windowMs: options.windowMs,
    limit: options.limit,
    store,
    key,
    countOnArrival: true,
    refuse: (res, windowMs) => sendError(res, limitMessage(windowMs)),
  });
}

function logIn(req: Request, user: User): Promise<void> {
  // passport ≥ 0.6 regenerates the session here, so a session id known before sign-in is worthless after.
  return new Promise((resolve, reject) => req.login(user, (error) => (error ? reject(error) : resolve())));
}

/** Writes the session to its store now (express-session would otherwise write it after the answer has left). */
function saveSession(req: Request): Promise<void> {
  return new Promise((resolve, reject) => req.session.save((error) => (error ? reject(error) : resolve())));
}

function logOut(req: Request): Promise<void> {
  return new Promise((resolve, reject) => req.logout((error) => (error ? reject(error) : resolve())));
}

function authenticateLocal(auth: passport.PassportStatic, req: Request, res: Response): Promise<User | null> {
  return new Promise((resolve, reject) => {
    auth.authenticate('local', { session: false }, (error: unknown, user: User | false) => {
      if (error) reject(error);
      else resolve(user || null);
    })(req, res, reject);
  });
}

const isUniqueViolation = (error: unknown) =>
  (error as { code?: string }).code === '23505' || (error as { cause?: { code?: string } }).cause?.code === '23505';

export function authRoutes(deps: RouterDeps & { passport: passport.PassportStatic; rateLimit?: AuthRateLimit }): ApiRouter {
  const limits = deps.rateLimit ?? defaultAuthRateLimit;
  const signinLimiter = signinLimit(limits, deps.rateLimitStores?.('signin'), accountKey);
  const signinAddressLimiter = signinLimit({ ...limits, limit: limits.limit * ADDRESS_FACTOR }, deps.rateLimitStores?.('signin-address'));
  const signupLimiter = signupLimit(limits, deps.rateLimitStores?.('signup'));

  return new ApiRouter('/api/auth', deps)
    .get('/session', { access: publicRoute, summary: 'Current user (or null) and the CSRF token' }, async ({ req, res, user }) => {
      const fresh = req.session.csrfToken === undefined;
      const token = csrfToken(req);
      // A new token is only good once its session is stored. Store it before answering: when the
      // session store cannot be written (database down), saveSession rejects and the error handler
      // answers 503 database_unavailable instead of 200 with a token no later request could match.
      if (fresh) await saveSession(req);
      res.json({ user, csrfToken: token });
    })
    .post(
      '/signup',
      { access: publicRoute, summary: 'Create an account and sign in', body: signupRequest, before: [signupLimiter] },
      async ({ req, res, db, log, body }) => {
        const passwordHash = await hashPassword(body.password);
        let created;
        try {
          [created] = await db
            .insert(users)
            .values({ name: body.name, email: body.email, passwordHash })
            .returning({ id: users.id, name: users.name, email: users.email });
        } catch (error) {
          if (isUniqueViolation(error)) {
            throw new HttpError(409, 'email_taken', 'An account with this e-mail address already exists.', [
              { field: 'email', message: 'An account with this e-mail address already exists.' },
            ]);
          }
          throw error;
        }
        const user = publicUser(created);
        await logIn(req, user);
        log.info({ userId: user.id }, 'account created');
        res.status(201).json({ user });
      },
    )
    .post(
      '/signin',
      { access: publicRoute, summary: 'Sign in with e-mail and password', body: signinRequest, before: [signinAddressLimiter, signinLimiter] },
      async ({ req, res, body }) => {
        // passport-local reads req.body; give it the normalised values.
        req.body = body;
        const user = await authenticateLocal(deps.passport, req, res);
        if (!user) throw new HttpError(401, 'bad_credentials', 'The e-mail address or the password is not right.');
        await logIn(req, user);
        res.json({ user });
      },
    )
    .post('/signout', { access: publicRoute, summary: 'Sign out (ends the session)' }, async ({ req, res }) => {
      await logOut(req);
      res.status(204).end();
    });
}
