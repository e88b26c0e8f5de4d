/** Per-user notification settings: every kind is on until the user switches it off. */
import { eq, sql } from 'drizzle-orm';
import { notificationKinds, type NotificationKind, type NotificationPreferences, type NotificationPreferencesPatch } from '@shared/api/account';
import { notificationSettings } from '../../schema/index';
import type { Database, Transaction } from '../db/client';

const column = {
  review_requested: 'reviewRequested',
  review_verdict: 'reviewVerdict',
  invitation_accepted: 'invitationAccepted',
} as const satisfies Record<NotificationKind, keyof typeof notificationSettings.$inferSelect>;

export const allOn: NotificationPreferences = Object.fromEntries(notificationKinds.map((k) => [k, true])) as NotificationPreferences;

export async function preferencesOf(db: Database | Transaction, userId: string): Promise<NotificationPreferences> {
  const [row] = await db.select().from(notificationSettings).where(eq(notificationSettings.userId, userId));
  if (!row) return { ...allOn };
  return Object.fromEntries(notificationKinds.map((k) => [k, row[column[k]]])) as NotificationPreferences;
}

export async function wantsNotification(db: Database | Transaction, userId: string, kind: NotificationKind): Promise<boolean> {
  return (await preferencesOf(db, userId))[kind];
}

export async function updatePreferences(
  db: Database,
  userId: string,
  patch: NotificationPreferencesPatch,
): Promise<NotificationPreferences> {
  const values: Partial<Record<(typeof column)[NotificationKind], boolean>> = {};
  for (const kind of notificationKinds) {
    const value = patch[kind];
    if (value !== undefined) values[column[kind]] = value;
  }
  if (Object.keys(values).length > 0) {
    await db
      .insert(notificationSettings)
      .values({ userId, ...values })
      .onConflictDoUpdate({ target: notificationSettings.userId, set: { ...values, updatedAt: sql`now()` } });
  }
  return preferencesOf(db, userId);
}
