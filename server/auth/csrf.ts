/**
 * Synchronizer-token CSRF protection: one random token per session, handed out by
 * GET /api/auth/session and required in the X-CSRF-Token header of every state-changing API
 * request, signed in or not. A new session (sign-in, sign-out) gets a new token.
 */
import { randomBytes, timingSafeEqual } from 'node:crypto';
import type { Request, RequestHandler } from 'express';
import { HttpError, sendError } from '../http/errors';

declare module 'express-session' {
  interface SessionData {
    csrfToken?: string;
  }
}

export const csrfHeader = 'x-csrf-token';
const safeMethods = new Set(['GET', 'HEAD', 'OPTIONS']);

/** The session's token, created (and the session thereby saved) on first use. */
export function csrfToken(req: Request): string {
  req.session.csrfToken ??= randomBytes(32).toString('base64url');
  return req.session.csrfToken;
}

function matches(expected: string | undefined, given: string | undefined): boolean {
  if (!expected || !given) return false;
  const a = Buffer.from(expected);
  const b = Buffer.from(given);
  return a.length === b.length && timingSafeEqual(a, b);
}

export const csrfProtection: RequestHandler = (req, res, next) => {
  if (safeMethods.has(req.method)) {
    next();
    return;
  }
  const given = req.get(csrfHeader);
  if (!matches(req.session?.csrfToken, given)) {
    sendError(
      res,
      new HttpError(403, 'csrf', 'The request is missing a valid X-CSRF-Token header. Reload the page and try again.'),
    );
    return;
  }
  next();
};
