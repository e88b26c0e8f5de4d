// Reviews: request a review from a team member with the reviewer role (or higher); the reviewer
// approves or requests changes on one revision. A verdict names the revision's content hash and
// is immutable (the table rejects UPDATE and DELETE); a later verdict is a new row.
import { and, desc, eq, inArray, sql, type SQL } from 'drizzle-orm';
import { alias } from 'drizzle-orm/pg-core';
import { z } from 'zod';
import { inboxQuery, reviewRequestRequest, verdictRequest, type ReviewRequest } from '@shared/api/worksheets';
import { memberships, reviewRequests, reviews, revisions, users, worksheets } from '../../schema/index';
import { recordAudit } from '../audit/audit';
import type { Database } from '../db/client';
import { HttpError, notFound } from '../http/errors';
import { ApiRouter, requireTeamRole, signedIn, type RouterDeps } from '../http/route';
import { roleAtLeast } from '../teams/roles';
import { revisionTeam } from '../worksheets/access';
import { verdictsOf } from '../worksheets/service';
import { emitSafely } from './events';

const revisionParams = z.object({ revisionId: z.uuid() });

const requesters = alias(users, 'requesters');
const reviewers = alias(users, 'reviewers');

/** Review requests matching `where`, with whether (and by which verdict) each was answered. */
async function requestsWhere(db: Database, where: SQL, page?: { limit: number; offset: number }): Promise<ReviewRequest[]> {
  // A request is answered by the first verdict of its reviewer on its revision given after it.
  const verdictId = sql<string | null>`(select ${reviews.id} from ${reviews} where ${reviews.revisionId} = ${reviewRequests.revisionId} and ${reviews.reviewerId} = ${reviewRequests.reviewerId} and ${reviews.createdAt} >= ${reviewRequests.createdAt} order by ${reviews.createdAt} asc limit 1)`;
  let query = db
    .select({
      id: reviewRequests.id,
      revisionId: reviewRequests.revisionId,
      worksheetId: worksheets.id,
      worksheetTitle: worksheets.title,
      revisionNumber: revisions.number,
      requestedById: requesters.id,
      requestedByName: requesters.name,
      reviewerId: reviewers.id,
      reviewerName: reviewers.name,
      message: reviewRequests.message,
      createdAt: reviewRequests.createdAt,
      verdictId,
    })
    .from(reviewRequests)
    .innerJoin(revisions, eq(revisions.id, reviewRequests.revisionId))
    .innerJoin(worksheets, eq(worksheets.id, revisions.worksheetId))
    .innerJoin(requesters, eq(requesters.id, reviewRequests.requestedBy))
    .innerJoin(reviewers, eq(reviewers.id, reviewRequests.reviewerId))
    .where(where)
    .orderBy(desc(reviewRequests.createdAt), desc(reviewRequests.id))
    .$dynamic();
  if (page) query = query.limit(page.limit).offset(page.offset);
  const rows = await query;
  return rows.map((r) => ({
    id: r.id,
    revisionId: r.revisionId,
    worksheetId: r.worksheetId,
    worksheetTitle: r.worksheetTitle,
    revisionNumber: r.revisionNumber,
    requestedBy: { id: r.requestedById, name: r.requestedByName },
    reviewer: { id: r.reviewerId, name: r.reviewerName },
    message: r.message,
    createdAt: r.createdAt.toISOString(),
    status: r.verdictId ? 'answered' : 'open',
    verdictId: r.verdictId,
  }));
}

export function reviewRoutes(deps: RouterDeps): ApiRouter[] {
  const byRevision = new ApiRouter('/api/revisions/:revisionId', deps)
    .post(
      '/review-requests',
      { access: requireTeamRole('editor', revisionTeam), summary: 'Ask a team reviewer to review a revision', params: revisionParams, body: reviewRequestRequest },
      async ({ res, db, user, team, params, body }) => {
        const [rev] = await db
          .select({ authorId: revisions.authorId, worksheetId: revisions.worksheetId })
          .from(revisions)
          .where(eq(revisions.id, params.revisionId));
        const [member] = await db
          .select({ role: memberships.role })
          .from(memberships)
          .where(and(eq(memberships.teamId, team.id), eq(memberships.userId, body.reviewerId)));
        if (!member || !roleAtLeast(member.role, 'reviewer')) {
          throw new HttpError(422, 'bad_reviewer', 'Choose a member of this team with the reviewer role (or higher).', [
            { field: 'reviewerId', message: member ? `This member is a ${member.role}, who cannot review.` : 'Not a member of this team.' },
          ]);
        }
        if (body.reviewerId === rev.authorId) {
          throw new HttpError(422, 'bad_reviewer', 'The author of a revision cannot review it. Choose another reviewer.', [
            { field: 'reviewerId', message: 'This is the author of the revision.' },
          ]);
        }
        const id = await db.transaction(async (tx) => {
          const [row] = await tx
            .insert(reviewRequests)
            .values({ revisionId: params.revisionId, requestedBy: user.id, reviewerId: body.reviewerId, message: body.message })
            .returning({ id: reviewRequests.id });
          await recordAudit(tx, {
            teamId: team.id,
            actorId: user.id,
            action: 'review.request',
            objectType: 'review_request',
            objectId: row.id,
            worksheetId: rev.worksheetId,
            details: { revisionId: params.revisionId, reviewerId: body.reviewerId },
          });
          return row.id;
        });
        emitSafely('requested', { requestId: id, revisionId: params.revisionId, worksheetId: rev.worksheetId, teamId: team.id, requestedBy: user.id, reviewerId: body.reviewerId });
        const [request] = await requestsWhere(db, eq(reviewRequests.id, id));
        res.status(201).json({ request });
      },
    )
    .get(
      '/reviews',
      { access: requireTeamRole('viewer', revisionTeam), summary: "A revision's verdicts and review requests", params: revisionParams },
      async ({ res, db, params }) => {
        const verdicts = (await verdictsOf(db, [params.revisionId])).get(params.revisionId) ?? [];
        const requests = await requestsWhere(db, eq(reviewRequests.revisionId, params.revisionId));
        res.json({ reviews: verdicts, requests });
      },
    )
    .post(
      '/reviews',
      { access: requireTeamRole('reviewer', revisionTeam), summary: 'Approve or request changes on a revision (names its content hash)', params: revisionParams, body: verdictRequest },
      async ({ res, db, user, team, params, body }) => {
        const [rev] = await db
          .select({ authorId: revisions.authorId, worksheetId: revisions.worksheetId, contentHash: revisions.contentHash })
          .from(revisions)
          .where(eq(revisions.id, params.revisionId));
        if (!rev) throw notFound();
        if (rev.authorId === user.id) {
          throw new HttpError(422, 'self_review', 'You wrote this revision, so you cannot review it. Ask another reviewer.');
        }
        if (body.contentHash !== undefined && body.contentHash !== rev.contentHash) {
          throw new HttpError(409, 'hash_mismatch', 'The content hash you reviewed is not the content hash of this revision. Reload the revision and review it again.', {
            expected: rev.contentHash,
            given: body.contentHash,
          });
        }
        const open = await requestsWhere(db, and(eq(reviewRequests.revisionId, params.revisionId), eq(reviewRequests.reviewerId, user.id))!);
        const reviewId = await db.transaction(async (tx) => {
          const [row] = await tx
            .insert(reviews)
            .values({ revisionId: params.revisionId, reviewerId: user.id, verdict: body.verdict, comment: body.comment.trim(), contentHash: rev.contentHash })
            .returning({ id: reviews.id });
          await recordAudit(tx, {
            teamId: team.id,
            actorId: user.id,
            action: 'review.verdict',
            objectType: 'review',
            objectId: row.id,
            worksheetId: rev.worksheetId,
            details: { revisionId: params.revisionId, verdict: body.verdict, contentHash: rev.contentHash },
          });
          return row.id;
        });
        const notify = [...new Set([rev.authorId, ...open.filter((r) => r.status === 'open').map((r) => r.requestedBy.id)])].filter((id) => id !== user.id);
        emitSafely('verdict', { reviewId, revisionId: params.revisionId, worksheetId: rev.worksheetId, teamId: team.id, reviewerId: user.id, verdict: body.verdict, notify });
        const review = ((await verdictsOf(db, [params.revisionId])).get(params.revisionId) ?? []).find((v) => v.id === reviewId)!;
        res.status(201).json({ review });
      },
    );

  const inbox = new ApiRouter('/api/review-requests', deps).get(
    '/',
    { access: signedIn, summary: 'Review requests addressed to me', query: inboxQuery },
    async ({ res, db, user, query }) => {
      // Only requests in teams I still belong to with a reviewing role.
      const mine = and(
        eq(reviewRequests.reviewerId, user.id),
        inArray(
          worksheets.teamId,
          db.select({ teamId: memberships.teamId }).from(memberships).where(and(eq(memberships.userId, user.id), inArray(memberships.role, ['owner', 'editor', 'reviewer']))),
        ),
      )!;
      const all = await requestsWhere(db, mine);
      const filtered = query.status === 'all' ? all : all.filter((r) => r.status === query.status);
      const start = (query.page - 1) * query.pageSize;
      res.json({ items: filtered.slice(start, start + query.pageSize), total: filtered.length, page: query.page, pageSize: query.pageSize });
    },
  );

  return [byRevision, inbox];
}

