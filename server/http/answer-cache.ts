/**
 * A small in-process cache of finished answers (body bytes and headers) for routes whose answer
 * changes only through an action that evicts it — the published view: a pinned revision is
 * immutable, and only revoking the link changes what its token shows.
 *
 * Only a cache: an entry is served for `ttlMs` after it was read from the database; then one
 * request renews it from the database while concurrent readers still get the entry they had (no
 * stampede of identical queries). A change made through another server process (a link revoked
 * there) thus shows here within `ttlMs` plus one database read; the process that made the change
 * evicts its own entry at once. A renewal that does not answer 200 evicts the entry. Bounded by
 * total bytes.
 */
import type { IncomingMessage, ServerResponse } from 'node:http';
import type { RequestHandler, Response } from 'express';

const looked = Symbol('answer cache looked at this request');

interface Entry {
  body: Buffer;
  /** Name, value, name, value, … as writeHead takes them (one call instead of one per header). */
  headers: string[];
  storedAt: number;
  /** When a request went to the database to renew this entry (its readers meanwhile get this one). */
  renewingSince?: number;
}

/** Longest a renewal may take before another request tries again (and readers stop getting the old entry). */
const RENEWAL_GRACE_MS = 5000;

export interface AnswerCacheOptions {
  /** Longest time an entry is served without looking at the database again (0 turns caching off). */
  ttlMs: number;
  /** The entry a request would be answered from, or null for requests the cache is not for. */
  key: (req: IncomingMessage) => string | null;
  /** Upper bound of the cached bodies, in bytes. Default 32 MiB. */
  maxBytes?: number;
  now?: () => number;
}

export class AnswerCache {
  /** Least recently used first (a Map keeps insertion order; a hit re-inserts). */
  private readonly entries = new Map<string, Entry>();
  private bytes = 0;
  private readonly maxBytes: number;
  private readonly now: () => number;
  hits = 0;
  misses = 0;

  constructor(private readonly options: AnswerCacheOptions) {
    this.maxBytes = options.maxBytes ?? 32 * 1024 * 1024;
    this.now = options.now ?? Date.now;
  }

  /**
   * Middleware doing the same as `handle` for requests that did not pass through it already (in
   * tests the app runs without a server in front; behind server/main.ts the server calls handle).
   */
  middleware(): RequestHandler {
    return (req, res, next) => {
      if (!this.handle(req, res)) next();
    };
  }

  /**
   * Answers `req` from the cache (true) or leaves it to the app (false). A request is looked at
   * once: the one sent on to renew an entry must reach the route, not the stale entry again.
   */
  handle(req: IncomingMessage, res: ServerResponse): boolean {
    const seen = req as IncomingMessage & { [looked]?: boolean };
    if (seen[looked]) return false;
    seen[looked] = true;
    return this.tryServe(this.options.key(req), res);
  }

  /**
   * Answers from the cache if `key` names a fresh entry (true), or leaves the request alone
   * (false) for the route, which renews or fills the entry.
   */
  private tryServe(key: string | null, res: ServerResponse): boolean {
    if (this.options.ttlMs <= 0 || key === null) return false;
    const entry = this.entries.get(key);
    if (!entry) {
      this.misses += 1;
      return false;
    }
    const now = this.now();
    if (now - entry.storedAt > this.options.ttlMs) {
      const renewing = entry.renewingSince !== undefined && now - entry.renewingSince < RENEWAL_GRACE_MS;
      if (!renewing) {
        // This request renews the entry; if its answer is not a 200 (revoked, gone), drop it.
        entry.renewingSince = now;
        this.misses += 1;
        res.once('finish', () => {
          if (res.statusCode !== 200 && this.entries.get(key) === entry) this.evict(key);
        });
        return false;
      }
    }
    this.entries.delete(key);
    this.entries.set(key, entry);
    this.hits += 1;
    res.writeHead(200, entry.headers);
    res.end(entry.body);
    return true;
  }

  /** Sends `body` as the answer and keeps it under `key`, with the answer's headers as set so far. */
  sendAndStore(res: Response, key: string, body: string, contentType: string): void {
    const bytes = Buffer.from(body, 'utf8');
    res.type(contentType);
    res.setHeader('Content-Length', String(bytes.length));
    if (this.options.ttlMs > 0) {
      const headers: string[] = [];
      for (const [name, value] of Object.entries(res.getHeaders())) {
        // Per-request headers (a session cookie, a request id) are not replayed.
        if (value === undefined || /^(set-cookie|date|x-request-id)$/i.test(name)) continue;
        headers.push(name, Array.isArray(value) ? value.join(', ') : String(value));
      }
      this.evict(key);
      if (bytes.length <= this.maxBytes) {
        this.entries.set(key, { body: bytes, headers, storedAt: this.now() });
        this.bytes += bytes.length;
        for (const [oldest, entry] of this.entries) {
          if (this.bytes <= this.maxBytes) break;
          this.entries.delete(oldest);
          this.bytes -= entry.body.length;
        }
      }
    }
    res.status(200).end(bytes);
  }

  evict(key: string): void {
    const entry = this.entries.get(key);
    if (!entry) return;
    this.entries.delete(key);
    this.bytes -= entry.body.length;
  }
}

/** A duration in milliseconds from the environment (0 allowed), the fallback when unset or blank; anything else is refused by name. */
export function msFromEnv(name: string, fallback: number): number {
  const raw = process.env[name];
  if (raw === undefined || raw.trim() === '') return fallback;
  const value = Number(raw);
  if (!Number.isFinite(value) || value < 0) throw new Error(`${name} must be a number of milliseconds, 0 or more (got "${raw}").`);
  return value;
}
