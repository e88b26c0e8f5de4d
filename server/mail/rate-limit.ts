/** Rate limiters of the mail-sending and token routes, answering in the API's error shape. */
import type { Request, RequestHandler } from 'express';
import rateLimit, { ipKeyGenerator, type Store } from 'express-rate-limit';
import { HttpError, sendError } from '../http/errors';
import type { RateLimit } from './service';

export const byAddress = (req: Request) => ipKeyGenerator(req.ip ?? '0.0.0.0');

/** The signed-in user, or the client address for requests that will be refused anyway. */
export const byUser = (req: Request) => (req.user ? `user:${req.user.id}` : byAddress(req));

/** The e-mail address named in the (not yet validated) body, normalised as the schemas do. */
export const byBodyEmail = (req: Request) => {
  const email = (req.body as { email?: unknown } | undefined)?.email;
  return typeof email === 'string' && email.trim() !== '' ? `email:${email.trim().toLowerCase()}` : byAddress(req);
};

/** `store`: shared counters (PostgreSQL, from RouterDeps.rateLimitStores); absent → per-process memory. */
export function mailRateLimiter(options: RateLimit, key: (req: Request) => string, what: string, store?: Store): RequestHandler {
  return rateLimit({
    store,
    windowMs: options.windowMs,
    limit: options.limit,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    keyGenerator: key,
    handler: (_req, res, _next, used) => {
      const minutes = Math.max(1, Math.ceil(used.windowMs / 60000));
      sendError(
        res,
        new HttpError(429, 'rate_limited', `Too many ${what}. Wait ${minutes} minute${minutes === 1 ? '' : 's'} and try again.`),
      );
    },
  });
}
