/**
 * The development mailbox: the messages the local mail server received, for site admins only, and
 * only while the local mail server is in use outside production (otherwise every route answers 404,
 * as if it did not exist). Site admins are the addresses in SITE_ADMINS (in development the demo
 * owner as well).
 */
import { count, desc, eq, sql } from 'drizzle-orm';
import { z } from 'zod';
import { mailboxListQuery, type MailboxMessage, type MailboxSummary } from '@shared/api/account';
import type { User } from '@shared/api/auth';
import { devMailbox, type DevMailboxRow } from '../../schema/index';
import { forbidden, notFound } from '../http/errors';
import { ApiRouter, signedIn, type RouterDeps } from '../http/route';
import { sanitizeMailHtml } from './fake-smtp';
import type { MailService } from './service';

const messageParams = z.object({ messageId: z.uuid() });

function summary(row: Pick<DevMailboxRow, 'id' | 'receivedAt' | 'fromHeader' | 'envelopeFrom' | 'envelopeTo' | 'subject'>): MailboxSummary {
  return {
    id: row.id,
    receivedAt: row.receivedAt.toISOString(),
    from: row.fromHeader || row.envelopeFrom,
    to: row.envelopeTo,
    subject: row.subject,
  };
}

export function mailboxRoutes(deps: RouterDeps & { mail: MailService }): ApiRouter {
  const { mail } = deps;
  const admit = (user: User) => {
    if (!mail.mailboxEnabled) throw notFound('The mailbox exists only in development, while the local mail server is in use.');
    if (!mail.isSiteAdmin(user.email)) throw forbidden('Only site admins (SITE_ADMINS) may open the mailbox.');
  };

  return new ApiRouter('/api/dev/mailbox', deps)
    .get(
      '/',
      { access: signedIn, summary: 'Messages received by the local mail server (site admins, development only)', query: mailboxListQuery },
      async ({ res, db, user, query }) => {
        admit(user);
        const where = query.to ? sql`array_to_string(${devMailbox.envelopeTo}, ' ') ilike ${`%${query.to}%`}` : undefined;
        const [{ total }] = await db.select({ total: count() }).from(devMailbox).where(where);
        const rows = await db
          .select({
            id: devMailbox.id,
            receivedAt: devMailbox.receivedAt,
            fromHeader: devMailbox.fromHeader,
            envelopeFrom: devMailbox.envelopeFrom,
            envelopeTo: devMailbox.envelopeTo,
            subject: devMailbox.subject,
          })
          .from(devMailbox)
          .where(where)
          .orderBy(desc(devMailbox.receivedAt), desc(devMailbox.id))
          .limit(query.pageSize)
          .offset((query.page - 1) * query.pageSize);
        res.json({ items: rows.map(summary), total, page: query.page, pageSize: query.pageSize });
      },
    )
    .get(
      '/:messageId',
      { access: signedIn, summary: 'One received message: text, sanitized HTML and source (site admins, development only)', params: messageParams },
      async ({ res, db, user, params }) => {
        admit(user);
        const [row] = await db.select().from(devMailbox).where(eq(devMailbox.id, params.messageId));
        if (!row) throw notFound('There is no such message in the mailbox.');
        const message: MailboxMessage = {
          ...summary(row),
          text: row.text,
          html: row.html === null ? null : sanitizeMailHtml(row.html),
          messageId: row.messageId,
          raw: row.raw,
        };
        res.json({ message });
      },
    )
    .delete('/', { access: signedIn, summary: 'Empty the mailbox (site admins, development only)' }, async ({ res, db, user }) => {
      admit(user);
      await db.delete(devMailbox);
      res.status(204).end();
    });
}
