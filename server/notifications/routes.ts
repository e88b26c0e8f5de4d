/** The signed-in user's account page: notification settings, and whether the mailbox is theirs to open. */
import { notificationPreferencesPatch, type AccountInfo } from '@shared/api/account';
import { ApiRouter, signedIn, type RouterDeps } from '../http/route';
import type { MailService } from '../mail/service';
import { preferencesOf, updatePreferences } from './preferences';

export function notificationRoutes(deps: RouterDeps & { mail: MailService }): ApiRouter {
  const { mail } = deps;
  return new ApiRouter('/api/account', deps)
    .get('/', { access: signedIn, summary: 'My account: notification settings and mailbox access' }, async ({ res, db, user }) => {
      const info: AccountInfo = {
        user,
        preferences: await preferencesOf(db, user.id),
        mailbox: mail.mailboxEnabled && mail.isSiteAdmin(user.email),
      };
      res.json(info);
    })
    .get('/notifications', { access: signedIn, summary: 'My notification settings' }, async ({ res, db, user }) => {
      res.json({ preferences: await preferencesOf(db, user.id) });
    })
    .patch(
      '/notifications',
      { access: signedIn, summary: 'Switch kinds of notification on or off', body: notificationPreferencesPatch },
      async ({ res, db, user, body }) => {
        res.json({ preferences: await updatePreferences(db, user.id, body) });
      },
    );
}
