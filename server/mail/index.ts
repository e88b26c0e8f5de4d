/**
 * Mail for the app: the routers of the mail-backed flows (for server/app.ts), and the mail service
 * a running server uses (for server/main.ts).
 */
import nodemailer from 'nodemailer';
import type { Database } from '../db/client';
import type { ApiRouter, RouterDeps } from '../http/route';
import { invitationRoutes } from '../invitations/routes';
import type { Logger } from '../log';
import { subscribeToReviewEvents } from '../notifications/notify';
import { notificationRoutes } from '../notifications/routes';
import { passwordResetRoutes } from '../password-reset/routes';
import { describeSmtpUrl, mailSettingsFromEnv, type MailSettings } from './config';
import { startFakeSmtp } from './fake-smtp';
import { mailboxRoutes } from './mailbox-routes';
import { MailService, type MailServiceOptions } from './service';

export { MailService } from './service';
export { notify } from '../notifications/notify';

export function mailRouters(deps: RouterDeps & { mail: MailService }): ApiRouter[] {
  return [...invitationRoutes(deps), passwordResetRoutes(deps), notificationRoutes(deps), mailboxRoutes(deps)];
}

/** Timeouts so that a mail server that does not answer holds a delivery attempt for seconds, not hours. */
const smtpTimeouts = { connectionTimeout: 15_000, greetingTimeout: 15_000, socketTimeout: 60_000 };

export interface RunningMail {
  mail: MailService;
  /** One line for the start-up banner: where mail goes. */
  description: string;
}

/**
 * The mail service of a running server, started: a transport to SMTP_URL, or the local mail server
 * on 127.0.0.1 when SMTP_URL is unset, the background sender, and the review notifications.
 */
export async function startMail(
  options: { db: Database; logger: Logger; settings?: MailSettings } & Pick<MailServiceOptions, 'sender' | 'limits'>,
): Promise<RunningMail> {
  const settings = options.settings ?? mailSettingsFromEnv();
  let mail: MailService;
  let description: string;
  if (settings.smtpUrl) {
    const transport = nodemailer.createTransport({ url: settings.smtpUrl, ...smtpTimeouts });
    mail = new MailService({ ...options, transport, from: settings.from, baseUrl: settings.baseUrl, siteAdmins: settings.siteAdmins, mailboxEnabled: false });
    description = `Mail goes to ${describeSmtpUrl(settings.smtpUrl)} (SMTP_URL), from ${settings.from}.`;
  } else {
    const fake = await startFakeSmtp({ db: options.db, logger: options.logger, port: settings.fakePort });
    const transport = nodemailer.createTransport({ host: fake.host, port: fake.port, secure: false, ignoreTLS: true, ...smtpTimeouts });
    const mailboxEnabled = !settings.production;
    mail = new MailService({
      ...options,
      transport,
      fake,
      from: settings.from,
      baseUrl: settings.baseUrl,
      siteAdmins: settings.siteAdmins,
      mailboxEnabled,
    });
    description = mailboxEnabled
      ? `Mail stays on this machine: local mail server on ${fake.host}:${fake.port}; site admins (${settings.siteAdmins.join(', ') || 'none: set SITE_ADMINS'}) read it at /dev/mailbox. Set SMTP_URL to send real mail.`
      : `Mail is kept by the local mail server on ${fake.host}:${fake.port} and reaches nobody: set SMTP_URL to send real mail.`;
    if (settings.production) options.logger.warn('SMTP_URL is not set: invitations and password-reset links reach nobody.');
  }
  subscribeToReviewEvents(mail);
  mail.start();
  return { mail, description };
}
