// Review happenings for whoever wants to react to them (mail notifications), emitted after the
// change is committed. Listeners must not throw; a failing listener never fails the request.
import { EventEmitter } from 'node:events';

export interface ReviewRequestedEvent {
  requestId: string;
  revisionId: string;
  worksheetId: string;
  teamId: string;
  requestedBy: string;
  reviewerId: string;
}

export interface ReviewVerdictEvent {
  reviewId: string;
  revisionId: string;
  worksheetId: string;
  teamId: string;
  reviewerId: string;
  verdict: 'approved' | 'changes_requested';
  /** Who asked for this review (open requests it answered) and the revision's author. */
  notify: string[];
}

interface ReviewEventMap {
  requested: [ReviewRequestedEvent];
  verdict: [ReviewVerdictEvent];
}

export const reviewEvents = new EventEmitter<ReviewEventMap>();

export function emitSafely<K extends keyof ReviewEventMap>(name: K, ...args: ReviewEventMap[K]): void {
  try {
    (reviewEvents.emit as (n: K, ...a: ReviewEventMap[K]) => boolean)(name, ...args);
  } catch {
    // A notification problem must not undo or fail a review; the listener logs its own errors.
  }
}
