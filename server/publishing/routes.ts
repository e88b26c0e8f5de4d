// Published links: a read-only view of one pinned revision for people without an account.
// The token carries 256 random bits and is shown once; only its SHA-256 is stored, so a copy of
// the database does not open any link.
import { randomBytes } from 'node:crypto';
import { and, desc, eq, isNull } from 'drizzle-orm';
import type { Store } from 'express-rate-limit';
import type { RequestHandler } from 'express';
import { z } from 'zod';
import type { Link, PublicRevisionAnswer, PublishAnswer } from '@shared/api/worksheets';
import { sha256Hex } from '@shared/engine/hash';
import { publishedLinks, revisions, users, worksheets } from '../../schema/index';
import { recordAudit } from '../audit/audit';
import { HttpError, notFound, sendError } from '../http/errors';
import { AnswerCache } from '../http/answer-cache';
import { RawJson, stringifyWithRaw } from '../http/raw-json';
import { failureLimiter } from '../http/failure-limiter';
import { ApiRouter, publicRoute, requireTeamRole, type RouterDeps } from '../http/route';
import { linkTeam, revisionTeam, worksheetTeam } from '../worksheets/access';

/**
 * The cache key of a published-view request (the token's hash), or null for any other request.
 * server/app.ts answers fresh entries before the rest of the middleware; this router fills them.
 */
export function publicAnswerKey(req: { method?: string; url?: string }): string | null {
  if (req.method !== 'GET' || !req.url) return null;
  const match = /^\/api\/public\/([A-Za-z0-9_-]{43})(?:\?|$)/.exec(req.url);
  return match ? tokenHash(match[1]) : null;
}

export interface PublicRateLimit {
  windowMs: number;
  /** Unknown or revoked tokens answered per client address within the window (guessing). */
  failures: number;
}

export const defaultPublicRateLimit: PublicRateLimit = { windowMs: 15 * 60 * 1000, failures: 60 };

const TOKEN_BYTES = 32;
const tokenPattern = /^[A-Za-z0-9_-]{43}$/;

export const newToken = () => randomBytes(TOKEN_BYTES).toString('base64url');
export const tokenHash = (token: string) => sha256Hex(token);

function guessLimiter(options: PublicRateLimit, store?: Store): RequestHandler {
  // Only answers ≥ 400 count, after the fact: reading a valid link is never throttled, however
  // many readers share an address, and costs no write (server/http/failure-limiter.ts).
  return failureLimiter({
    windowMs: options.windowMs,
    limit: options.failures,
    store,
    refuse: (res, windowMs) => {
      const minutes = Math.max(1, Math.ceil(windowMs / 60000));
      sendError(res, new HttpError(429, 'rate_limited', `Too many requests for unknown links. Wait ${minutes} minute${minutes === 1 ? '' : 's'} and try again.`));
    },
  });
}

const linkColumns = {
  id: publishedLinks.id,
  revisionId: publishedLinks.revisionId,
  revisionNumber: revisions.number,
  createdAt: publishedLinks.createdAt,
  createdById: users.id,
  createdByName: users.name,
  revokedAt: publishedLinks.revokedAt,
};

function linkAnswer(row: { id: string; revisionId: string; revisionNumber: number; createdAt: Date; createdById: string; createdByName: string; revokedAt: Date | null }): Link {
  return {
    id: row.id,
    revisionId: row.revisionId,
    revisionNumber: row.revisionNumber,
    createdAt: row.createdAt.toISOString(),
    createdBy: { id: row.createdById, name: row.createdByName },
    revokedAt: row.revokedAt ? row.revokedAt.toISOString() : null,
  };
}

async function findLink(db: RouterDeps['db'], id: string): Promise<Link | null> {
  const [row] = await db
    .select(linkColumns)
    .from(publishedLinks)
    .innerJoin(revisions, eq(revisions.id, publishedLinks.revisionId))
    .innerJoin(users, eq(users.id, publishedLinks.createdBy))
    .where(eq(publishedLinks.id, id));
  return row ? linkAnswer(row) : null;
}

export function publishingRoutes(deps: RouterDeps & { publicRateLimit?: PublicRateLimit; publishedAnswers?: AnswerCache }): ApiRouter[] {
  const limiter = guessLimiter(deps.publicRateLimit ?? defaultPublicRateLimit, deps.rateLimitStores?.('public-link-guesses'));
  // Published answers by token hash (server/http/answer-cache.ts, served in front by server/app.ts):
  // a pinned revision never changes, so a valid link is answered from memory for
  // PUBLIC_LINK_CACHE_MS (default 1 s) after it was read; revoking evicts at once here and within
  // that time on other server processes.
  const answers = deps.publishedAnswers ?? new AnswerCache({ ttlMs: 0, key: publicAnswerKey });

  const byRevision = new ApiRouter('/api/revisions/:revisionId/links', deps).post(
    '/',
    { access: requireTeamRole('owner', revisionTeam), summary: 'Publish a revision: a read-only link (token shown once)', params: z.object({ revisionId: z.uuid() }) },
    async ({ res, db, user, team, params }) => {
      const token = newToken();
      const link = await db.transaction(async (tx) => {
        const [rev] = await tx.select({ worksheetId: revisions.worksheetId }).from(revisions).where(eq(revisions.id, params.revisionId));
        const [row] = await tx
          .insert(publishedLinks)
          .values({ revisionId: params.revisionId, tokenHash: tokenHash(token), createdBy: user.id })
          .returning({ id: publishedLinks.id });
        await recordAudit(tx, {
          teamId: team.id,
          actorId: user.id,
          action: 'link.publish',
          objectType: 'link',
          objectId: row.id,
          worksheetId: rev.worksheetId,
          details: { revisionId: params.revisionId },
        });
        return row;
      });
      const answer: PublishAnswer = { link: (await findLink(db, link.id))!, token, url: `/p/${token}` };
      res.status(201).json(answer);
    },
  );

  const byWorksheet = new ApiRouter('/api/worksheets/:worksheetId/links', deps).get(
    '/',
    { access: requireTeamRole('owner', worksheetTeam), summary: "A worksheet's published links (without tokens)", params: z.object({ worksheetId: z.uuid() }) },
    async ({ res, db, params }) => {
      const rows = await db
        .select(linkColumns)
        .from(publishedLinks)
        .innerJoin(revisions, eq(revisions.id, publishedLinks.revisionId))
        .innerJoin(users, eq(users.id, publishedLinks.createdBy))
        .where(eq(revisions.worksheetId, params.worksheetId))
        .orderBy(desc(publishedLinks.createdAt), desc(publishedLinks.id));
      res.json({ items: rows.map(linkAnswer) });
    },
  );

  const links = new ApiRouter('/api/links', deps).post(
    '/:linkId/revoke',
    { access: requireTeamRole('owner', linkTeam), summary: 'Revoke a published link', params: z.object({ linkId: z.uuid() }) },
    async ({ res, db, user, team, params }) => {
      let revokedHash: string | null = null;
      await db.transaction(async (tx) => {
        const changed = await tx
          .update(publishedLinks)
          .set({ revokedAt: new Date(), revokedBy: user.id })
          .where(and(eq(publishedLinks.id, params.linkId), isNull(publishedLinks.revokedAt)))
          .returning({ revisionId: publishedLinks.revisionId, tokenHash: publishedLinks.tokenHash });
        if (changed.length > 0) revokedHash = changed[0].tokenHash;
        if (changed.length > 0) {
          const [rev] = await tx.select({ worksheetId: revisions.worksheetId }).from(revisions).where(eq(revisions.id, changed[0].revisionId));
          await recordAudit(tx, {
            teamId: team.id,
            actorId: user.id,
            action: 'link.revoke',
            objectType: 'link',
            objectId: params.linkId,
            worksheetId: rev.worksheetId,
            details: { revisionId: changed[0].revisionId },
          });
        }
      });
      // After the commit, so that no read in between can put the old answer back.
      if (revokedHash) answers.evict(revokedHash);
      res.json({ link: await findLink(db, params.linkId) });
    },
  );

  const published = new ApiRouter('/api/public', deps).get(
    '/:token',
    { access: publicRoute, summary: 'The published revision behind a link (no sign-in; revoked → 410)', before: [limiter] },
    async ({ req, res, db }) => {
      const token = req.params.token;
      if (typeof token !== 'string' || !tokenPattern.test(token)) throw notFound('There is no published worksheet at this link.');
      const hash = tokenHash(token);
      const [row] = await db
        .select({
          revokedAt: publishedLinks.revokedAt,
          title: worksheets.title,
          number: revisions.number,
          createdAt: revisions.createdAt,
          contentHash: revisions.contentHash,
          resultsHash: revisions.resultsHash,
          engineVersion: revisions.engineVersion,
          content: revisions.content,
          results: revisions.results,
        })
        .from(publishedLinks)
        .innerJoin(revisions, eq(revisions.id, publishedLinks.revisionId))
        .innerJoin(worksheets, eq(worksheets.id, revisions.worksheetId))
        .where(eq(publishedLinks.tokenHash, hash));
      if (!row) throw notFound('There is no published worksheet at this link.');
      if (row.revokedAt) throw new HttpError(410, 'link_revoked', 'This link has been withdrawn by the team that published it.');
      // The stored document and results are canonical JSON text already: they are spliced into
      // the answer as they are (RawJson), so the reader gets exactly the text the hashes were
      // taken of, without a parse and re-serialisation of the results (most of the bytes).
      const { title } = JSON.parse(row.content) as { title?: string };
      const answer: Omit<PublicRevisionAnswer, 'revision'> & { revision: Omit<PublicRevisionAnswer['revision'], 'document' | 'results'> & { document: RawJson; results: RawJson } } = {
        // The title of the pinned revision, not the worksheet's current one.
        title: title ?? row.title,
        revision: {
          number: row.number,
          createdAt: row.createdAt.toISOString(),
          contentHash: row.contentHash,
          resultsHash: row.resultsHash,
          engineVersion: row.engineVersion,
          document: new RawJson(row.content),
          results: new RawJson(row.results),
        },
      };
      res.set('X-Robots-Tag', 'noindex, nofollow');
      res.set('Referrer-Policy', 'no-referrer');
      answers.sendAndStore(res, hash, stringifyWithRaw(answer), 'application/json; charset=utf-8');
    },
  );

  return [byRevision, byWorksheet, links, published];
}
