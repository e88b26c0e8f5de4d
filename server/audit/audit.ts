// The audit trail: one immutable row per state-changing action (the table rejects UPDATE and
// DELETE). Written in the same transaction as the change it describes, so the two stand or fall together.
import { auditEvents } from '../../schema/index';
import type { Database, Transaction } from '../db/client';

export type AuditAction =
  | 'worksheet.create'
  | 'worksheet.import'
  | 'worksheet.archive'
  | 'worksheet.restore'
  | 'worksheet.fork'
  | 'revision.save'
  | 'dataset.upload'
  | 'link.publish'
  | 'link.revoke'
  | 'review.request'
  | 'review.verdict';

export interface AuditEntry {
  teamId: string;
  actorId: string | null;
  action: AuditAction;
  objectType: 'worksheet' | 'revision' | 'dataset' | 'link' | 'review' | 'review_request';
  objectId: string;
  worksheetId?: string | null;
  details?: Record<string, unknown>;
}

export async function recordAudit(db: Database | Transaction, entry: AuditEntry): Promise<void> {
  await db.insert(auditEvents).values({
    teamId: entry.teamId,
    actorId: entry.actorId,
    action: entry.action,
    objectType: entry.objectType,
    objectId: entry.objectId,
    worksheetId: entry.worksheetId ?? null,
    details: entry.details ?? {},
  });
}
