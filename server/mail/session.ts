/** Session helpers the mail-backed account flows share with sign-in. */
import type { Request } from 'express';
import { sql } from 'drizzle-orm';
import type { User } from '@shared/api/auth';
import type { Database } from '../db/client';

/** Signs `user` in; passport regenerates the session, so an earlier session id is worthless after. */
export function logIn(req: Request, user: User): Promise<void> {
  return new Promise((resolve, reject) => req.login(user, (error) => (error ? reject(error) : resolve())));
}

/**
 * Ends every stored session of a user except `keepSid` (the connect-pg-simple table `session`, whose
 * `sess` JSON holds `passport.user` = the user id). Returns how many were ended.
 */
export async function endOtherSessions(db: Database, userId: string, keepSid: string | null): Promise<number> {
  const result = await db.execute(
    keepSid
      ? sql`delete from "session" where "sess"->'passport'->>'user' = ${userId} and "sid" <> ${keepSid}`
      : sql`delete from "session" where "sess"->'passport'->>'user' = ${userId}`,
  );
  return result.rowCount ?? 0;
}
