/**
 * Notifications by mail: review requested (to the reviewer), review verdict (to the revision's
 * author and whoever asked for the review), invitation accepted (to the owner who invited).
 *
 * `notify(mail, kind, payload)` returns at once: the lookups and the outbox insert run in the
 * background, failures are logged, and nothing of it can fail or slow the request that caused it.
 * Each recipient's settings are respected, and a recipient who has left the team hears nothing.
 * The review routes emit `reviewEvents` (server/reviews/events.ts); `subscribeToReviewEvents`
 * connects them while the mail service runs.
 */
import { and, eq } from 'drizzle-orm';
import { alias } from 'drizzle-orm/pg-core';
import type { NotificationKind } from '@shared/api/account';
import type { TeamRole } from '@shared/api/teams';
import { memberships, reviewRequests, reviews, revisions, teams, users, worksheets } from '../../schema/index';
import type { MailService } from '../mail/service';
import { invitationAcceptedMail, reviewRequestedMail, reviewVerdictMail } from '../mail/templates';
import { reviewEvents, type ReviewRequestedEvent, type ReviewVerdictEvent } from '../reviews/events';
import { wantsNotification } from './preferences';

export interface InvitationAcceptedEvent {
  invitationId: string;
  teamId: string;
  /** The owner who sent the invitation (null when that account is gone). */
  invitedBy: string | null;
  memberId: string;
  role: TeamRole;
}

export interface NotificationPayloads {
  review_requested: ReviewRequestedEvent;
  review_verdict: ReviewVerdictEvent;
  invitation_accepted: InvitationAcceptedEvent;
}

export function notify<K extends NotificationKind>(mail: MailService, kind: K, payload: NotificationPayloads[K]): void {
  mail.background(`notify ${kind}`, async () => {
    switch (kind) {
      case 'review_requested':
        return reviewRequested(mail, payload as ReviewRequestedEvent);
      case 'review_verdict':
        return reviewVerdict(mail, payload as ReviewVerdictEvent);
      case 'invitation_accepted':
        return invitationAccepted(mail, payload as InvitationAcceptedEvent);
    }
  });
}

/** Listens to the review routes' events until the mail service closes. */
export function subscribeToReviewEvents(mail: MailService): void {
  const onRequested = (event: ReviewRequestedEvent) => notify(mail, 'review_requested', event);
  const onVerdict = (event: ReviewVerdictEvent) => notify(mail, 'review_verdict', event);
  reviewEvents.on('requested', onRequested);
  reviewEvents.on('verdict', onVerdict);
  mail.onClose(() => {
    reviewEvents.off('requested', onRequested);
    reviewEvents.off('verdict', onVerdict);
  });
}

async function recipient(mail: MailService, userId: string, teamId: string, kind: NotificationKind) {
  const [row] = await mail.db
    .select({ id: users.id, name: users.name, email: users.email })
    .from(users)
    .innerJoin(memberships, and(eq(memberships.userId, users.id), eq(memberships.teamId, teamId)))
    .where(eq(users.id, userId));
  if (!row) return null;
  return (await wantsNotification(mail.db, userId, kind)) ? row : null;
}

const requesters = alias(users, 'notify_requesters');

async function reviewRequested(mail: MailService, event: ReviewRequestedEvent): Promise<void> {
  const [row] = await mail.db
    .select({
      message: reviewRequests.message,
      requesterName: requesters.name,
      revisionNumber: revisions.number,
      worksheetTitle: worksheets.title,
      teamName: teams.name,
    })
    .from(reviewRequests)
    .innerJoin(revisions, eq(revisions.id, reviewRequests.revisionId))
    .innerJoin(worksheets, eq(worksheets.id, revisions.worksheetId))
    .innerJoin(teams, eq(teams.id, worksheets.teamId))
    .innerJoin(requesters, eq(requesters.id, reviewRequests.requestedBy))
    .where(eq(reviewRequests.id, event.requestId));
  // Unknown here: an event of another app's database (several apps share a process in tests).
  if (!row) return;
  const to = await recipient(mail, event.reviewerId, event.teamId, 'review_requested');
  if (!to) return;
  const content = reviewRequestedMail({
    baseUrl: mail.baseUrl,
    link: mail.link(`/revisions/${event.revisionId}`),
    settingsUrl: mail.link('/account/notifications'),
    requestedByName: row.requesterName,
    worksheetTitle: row.worksheetTitle,
    revisionNumber: row.revisionNumber,
    teamName: row.teamName,
    message: row.message,
  });
  await mail.enqueue({
    kind: 'review_requested',
    to: to.email,
    recipientUserId: to.id,
    ...content,
    dedupeKey: `review_requested:${event.requestId}`,
  });
}

const reviewers = alias(users, 'notify_reviewers');

async function reviewVerdict(mail: MailService, event: ReviewVerdictEvent): Promise<void> {
  const [row] = await mail.db
    .select({
      verdict: reviews.verdict,
      comment: reviews.comment,
      contentHash: reviews.contentHash,
      reviewerName: reviewers.name,
      revisionNumber: revisions.number,
      worksheetTitle: worksheets.title,
    })
    .from(reviews)
    .innerJoin(revisions, eq(revisions.id, reviews.revisionId))
    .innerJoin(worksheets, eq(worksheets.id, revisions.worksheetId))
    .innerJoin(reviewers, eq(reviewers.id, reviews.reviewerId))
    .where(eq(reviews.id, event.reviewId));
  if (!row) return;
  const content = reviewVerdictMail({
    baseUrl: mail.baseUrl,
    link: mail.link(`/revisions/${event.revisionId}`),
    settingsUrl: mail.link('/account/notifications'),
    reviewerName: row.reviewerName,
    verdict: row.verdict,
    comment: row.comment,
    worksheetTitle: row.worksheetTitle,
    revisionNumber: row.revisionNumber,
    contentHash: row.contentHash,
  });
  for (const userId of new Set(event.notify)) {
    if (userId === event.reviewerId) continue;
    const to = await recipient(mail, userId, event.teamId, 'review_verdict');
    if (!to) continue;
    await mail.enqueue({
      kind: 'review_verdict',
      to: to.email,
      recipientUserId: to.id,
      ...content,
      dedupeKey: `review_verdict:${event.reviewId}:${userId}`,
    });
  }
}

async function invitationAccepted(mail: MailService, event: InvitationAcceptedEvent): Promise<void> {
  if (!event.invitedBy || event.invitedBy === event.memberId) return;
  const [row] = await mail.db
    .select({ teamName: teams.name, memberName: users.name, memberEmail: users.email })
    .from(teams)
    .innerJoin(users, eq(users.id, event.memberId))
    .where(eq(teams.id, event.teamId));
  if (!row) return;
  const to = await recipient(mail, event.invitedBy, event.teamId, 'invitation_accepted');
  if (!to) return;
  const content = invitationAcceptedMail({
    baseUrl: mail.baseUrl,
    link: mail.link(`/teams/${event.teamId}`),
    settingsUrl: mail.link('/account/notifications'),
    memberName: row.memberName,
    memberEmail: row.memberEmail,
    teamName: row.teamName,
    role: event.role,
  });
  await mail.enqueue({
    kind: 'invitation_accepted',
    to: to.email,
    recipientUserId: to.id,
    ...content,
    dedupeKey: `invitation_accepted:${event.invitationId}`,
  });
}
