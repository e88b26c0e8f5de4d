/**
 * A limiter that counts only failed requests: for published links (guessed tokens) and sign-in
 * (wrong passwords).
 *
 * Why not express-rate-limit's `skipSuccessfulRequests`: it counts every request when it arrives
 * and takes successful ones back when they finish, so requests still in flight count as failures.
 * Sixty readers of one published link behind one address (an office behind NAT, a proxy) were
 * refused with 429 although none had failed; with a shared store, each successful read also cost
 * two writes to the database. Here a request first reads the count (refused once `limit` failures
 * were seen in the window) and only an answer of 400 or above adds one, before it is sent.
 *
 * The price: requests sent at the same instant all read the count before any of them adds to it,
 * so a burst can exceed the limit by its own size. That is harmless for 256-bit link tokens, which
 * cannot be guessed anyway. Sign-in (guessable passwords) uses `countOnArrival`: every request
 * counts when it arrives, as with express-rate-limit, so a burst cannot exceed the limit, and a
 * successful one is taken back before its answer leaves, so that the client's next request already
 * sees the count without it (express-rate-limit takes it back after the answer, and a quick next
 * attempt could be refused for a success).
 */
import type { Request, RequestHandler, Response } from 'express';
import { ipKeyGenerator, MemoryStore, type Options, type Store } from 'express-rate-limit';

export interface FailureLimiterOptions {
  windowMs: number;
  /** Failed requests allowed per key within the window; the next request is refused. */
  limit: number;
  /** Shared counters (PostgreSQL); default: this process's memory. */
  store?: Store;
  key?: (req: Request) => string;
  /** Answers a refused request (429 in the API's error shape). */
  refuse: (res: Parameters<RequestHandler>[1], windowMs: number) => void;
  /** Called when the store cannot be read or written; the request is then let through. */
  onStoreError?: (error: unknown) => void;
  /** Count every request on arrival and take successes back (see above). */
  countOnArrival?: boolean;
}

export function failureLimiter(options: FailureLimiterOptions): RequestHandler {
  const store = options.store ?? new MemoryStore();
  store.init?.({ windowMs: options.windowMs } as Options);
  const keyOf = options.key ?? ((req: Request) => ipKeyGenerator(req.ip ?? '0.0.0.0'));
  if (!store.get) throw new Error('failureLimiter needs a store that can read a count (get)');

  const refuseWithRetry = (res: Parameters<RequestHandler>[1], resetTime: Date | undefined) => {
    const seconds = resetTime ? Math.max(1, Math.ceil((resetTime.getTime() - Date.now()) / 1000)) : Math.ceil(options.windowMs / 1000);
    res.setHeader('Retry-After', String(seconds));
    options.refuse(res, options.windowMs);
  };

  if (options.countOnArrival) {
    if (!store.decrement) throw new Error('failureLimiter with countOnArrival needs a store that can decrement');
    return async (req, res, next) => {
      const key = keyOf(req);
      let counted = false;
      try {
        const info = await store.increment(key);
        counted = true;
        if (info.totalHits > options.limit) {
          refuseWithRetry(res, info.resetTime);
          return;
        }
      } catch (error) {
        options.onStoreError?.(error);
      }
      if (counted) beforeAnswer(res, (status) => status < 400, () => store.decrement!(key), options.onStoreError);
      next();
    };
  }

  return async (req, res, next) => {
    const key = keyOf(req);
    let hits = 0;
    let resetTime: Date | undefined;
    try {
      const info = await store.get!(key);
      hits = info?.totalHits ?? 0;
      resetTime = info?.resetTime;
    } catch (error) {
      // Counting must not take the route down with the store; the route's own queries will
      // report a lost database.
      options.onStoreError?.(error);
    }
    if (hits >= options.limit) {
      refuseWithRetry(res, resetTime);
      return;
    }
    // A failure is counted before its answer leaves, so the next request from the same client
    // (on any process) already sees it.
    beforeAnswer(res, (status) => status >= 400, () => store.increment(key), options.onStoreError);
    next();
  };
}

/** Runs `action` (a counter update) before the answer leaves, for answers whose status `when` accepts. */
function beforeAnswer(res: Response, when: (status: number) => boolean, action: () => unknown, onError?: (error: unknown) => void): void {
  const end = res.end.bind(res) as (...args: unknown[]) => unknown;
  res.end = ((...args: unknown[]) => {
    if (!when(res.statusCode)) return end(...args);
    Promise.resolve()
      .then(action)
      .catch((error: unknown) => onError?.(error))
      .finally(() => end(...args));
    return res;
  }) as typeof res.end;
}
