/**
 * Short texts shown wherever a revision appears (timeline, revision page, comparison, published
 * view). Pure: no Angular, so it can be unit-tested under mocha.
 */
import type { ReviewVerdict } from '@shared/api/worksheets';

/** Characters of a SHA-256 hex digest shown as a revision's short hash. */
export const SHORT_HASH_LENGTH = 10;

export function shortHash(hash: string | null | undefined): string {
  return (hash ?? '').slice(0, SHORT_HASH_LENGTH);
}

const dateTime = new Intl.DateTimeFormat('en-GB', {
  year: 'numeric',
  month: 'short',
  day: 'numeric',
  hour: '2-digit',
  minute: '2-digit',
  timeZoneName: 'short',
});

const dateOnly = new Intl.DateTimeFormat('en-GB', { year: 'numeric', month: 'long', day: 'numeric' });

/** "4 Mar 2025, 09:12 UTC" in the reader's time zone. */
export function formatDateTime(iso: string): string {
  const date = new Date(iso);
  return Number.isNaN(date.getTime()) ? iso : dateTime.format(date);
}

/** "4 March 2025" (report headers). */
export function formatDate(iso: string): string {
  const date = new Date(iso);
  return Number.isNaN(date.getTime()) ? iso : dateOnly.format(date);
}

/** "just now", "5 min ago", "3 h ago", "2 days ago", then the date. `now` is passed in for tests. */
export function formatAge(iso: string, now: number = Date.now()): string {
  const then = new Date(iso).getTime();
  if (Number.isNaN(then)) return iso;
  const seconds = Math.max(0, Math.round((now - then) / 1000));
  if (seconds < 45) return 'just now';
  const minutes = Math.round(seconds / 60);
  if (minutes < 60) return `${minutes} min ago`;
  const hours = Math.round(minutes / 60);
  if (hours < 24) return `${hours} h ago`;
  const days = Math.round(hours / 24);
  if (days < 14) return days === 1 ? 'yesterday' : `${days} days ago`;
  return formatDate(iso);
}

/** The verdict that counts for each reviewer (their latest), newest first. */
export function latestVerdicts(reviews: readonly ReviewVerdict[]): ReviewVerdict[] {
  const byReviewer = new Map<string, ReviewVerdict>();
  for (const review of reviews) {
    const known = byReviewer.get(review.reviewer.id);
    if (!known || known.createdAt <= review.createdAt) byReviewer.set(review.reviewer.id, review);
  }
  return [...byReviewer.values()].sort((a, b) => (a.createdAt < b.createdAt ? 1 : a.createdAt > b.createdAt ? -1 : 0));
}

export const VERDICT_LABEL: Readonly<Record<ReviewVerdict['verdict'], string>> = {
  approved: 'Approved',
  changes_requested: 'Changes requested',
};

/** "Approved by Priya Raman" */
export function verdictText(review: Pick<ReviewVerdict, 'verdict' | 'reviewer'>): string {
  return `${VERDICT_LABEL[review.verdict]} by ${review.reviewer.name}`;
}

/** A percentage for a confidence level: 0.95 → "95 %", 0.999 → "99.9 %". */
export function percentText(level: number): string {
  const percent = Number((level * 100).toFixed(6));
  return `${percent} %`;
}

/** A relative change as a signed percentage: 0.0512 → "+5.12 %", null → "". */
export function relativeChangeText(change: number | null): string {
  if (change === null || !Number.isFinite(change)) return '';
  const percent = change * 100;
  const abs = Math.abs(percent);
  const digits = abs >= 100 ? 0 : abs >= 10 ? 1 : abs >= 1 ? 2 : 3;
  const text = percent.toFixed(digits);
  return `${percent > 0 ? '+' : percent < 0 ? '' : '±'}${text} %`;
}
