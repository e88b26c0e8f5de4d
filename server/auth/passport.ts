import { eq } from 'drizzle-orm';
import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import { users } from '../../schema/index';
import type { User } from '@shared/api/auth';
import type { Database } from '../db/client';
import { decoyHash, verifyPassword } from './password';

declare global {
  namespace Express {
    // The signed-in user as passport puts it on req.user.
    interface User {
      id: string;
      name: string;
      email: string;
    }
  }
}

export const publicUser = (row: { id: string; name: string; email: string }): User => ({
  id: row.id,
  name: row.name,
  email: row.email,
});

/** Checks an e-mail and password; the same (null) answer for an unknown e-mail and a wrong password. */
export async function checkCredentials(db: Database, email: string, password: string): Promise<User | null> {
  const [row] = await db.select().from(users).where(eq(users.email, email.trim().toLowerCase()));
  if (!row) {
    // Spend the same time as a real check so response timing does not reveal which e-mails exist.
    await verifyPassword(password, await decoyHash());
    return null;
  }
  return (await verifyPassword(password, row.passwordHash)) ? publicUser(row) : null;
}

/** A passport instance of its own per app, so several apps (tests) never share strategies. */
export function createPassport(db: Database): passport.PassportStatic {
  const instance = new passport.Passport() as passport.PassportStatic;
  // Computed now so that the first unknown e-mail does not pay for it (and stand out by its timing).
  void decoyHash();
  instance.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password', session: true }, (email, password, done) => {
      checkCredentials(db, email, password).then(
        (user) => done(null, user ?? false),
        (error) => done(error),
      );
    }),
  );
  instance.serializeUser((user, done) => done(null, user.id));
  instance.deserializeUser((id: string, done) => {
    db.select({ id: users.id, name: users.name, email: users.email })
      .from(users)
      .where(eq(users.id, id))
      .then(
        // A deleted account simply ends the session.
        ([row]) => done(null, row ? publicUser(row) : false),
        (error) => done(error),
      );
  });
  return instance;
}
