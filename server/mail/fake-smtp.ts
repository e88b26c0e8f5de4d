/**
 * The local mail server for development and tests: a real SMTP server (smtp-server) on 127.0.0.1
 * that accepts every message, parses it (mailparser) and keeps it in the `dev_mailbox` table, where
 * the mailbox page and the test suites read it. It never relays anything anywhere.
 *
 *     const fake = await startFakeSmtp({ db, logger });   // { port, url, close() }
 *     const transport = nodemailer.createTransport({ url: fake.url });
 */
import type { AddressInfo } from 'node:net';
import { simpleParser, type AddressObject } from 'mailparser';
import sanitizeHtml from 'sanitize-html';
import { SMTPServer } from 'smtp-server';
import { devMailbox } from '../../schema/index';
import type { Database } from '../db/client';
import type { Logger } from '../log';

export interface FakeSmtp {
  readonly host: string;
  readonly port: number;
  /** `smtp://127.0.0.1:<port>` for nodemailer. */
  readonly url: string;
  /** Messages stored so far by this server (for tests that wait for a delivery). */
  received(): number;
  close(): Promise<void>;
}

export interface FakeSmtpOptions {
  db: Database;
  logger: Logger;
  /** 0 (default) picks a free port. */
  port?: number;
  /** Largest message accepted, in bytes (default 10 MB). */
  maxBytes?: number;
}

const host = '127.0.0.1';

/** Text of a parsed address header ("Name <a@b>, c@d"). */
function addressText(value: AddressObject | AddressObject[] | undefined): string {
  if (!value) return '';
  return (Array.isArray(value) ? value : [value]).map((a) => a.text).join(', ');
}

/**
 * HTML of a received message made safe to show inside the app: no scripts, no forms, no frames and
 * no outside resources (only `data:` images survive). Inline styles stay, so a message looks as sent.
 */
export function sanitizeMailHtml(html: string): string {
  return sanitizeHtml(html, {
    allowedTags: [
      ...sanitizeHtml.defaults.allowedTags,
      'img', 'span', 'div', 'table', 'thead', 'tbody', 'tfoot', 'tr', 'td', 'th', 'center', 'font', 'hr',
    ],
    allowedAttributes: {
      '*': ['style', 'align', 'width', 'height', 'bgcolor', 'color', 'border', 'cellpadding', 'cellspacing', 'role', 'lang', 'dir'],
      a: ['href', 'title', 'target', 'rel'],
      img: ['src', 'alt', 'width', 'height'],
    },
    allowedSchemes: ['http', 'https', 'mailto'],
    allowedSchemesByTag: { img: ['data'] },
    // The document's title and head are not content; the body becomes a div that keeps its style.
    nonTextTags: ['style', 'script', 'textarea', 'option', 'noscript', 'title', 'head'],
    transformTags: {
      '*': (tagName, attribs) => {
        const kept = { ...attribs };
        // Styles stay, except those that would fetch something (background images, imports).
        if (kept.style && /url\s*\(|@import|expression\s*\(/i.test(kept.style)) delete kept.style;
        if (tagName === 'a') return { tagName, attribs: { ...kept, target: '_blank', rel: 'noopener noreferrer' } };
        if (tagName === 'body') return { tagName: 'div', attribs: kept };
        return { tagName, attribs: kept };
      },
    },
  });
}

export async function startFakeSmtp(options: FakeSmtpOptions): Promise<FakeSmtp> {
  const { db, logger } = options;
  const maxBytes = options.maxBytes ?? 10 * 1024 * 1024;
  let stored = 0;

  const server = new SMTPServer({
    name: 'spreadproof-local-mail',
    banner: 'Spreadproof local mail server (development only; nothing is relayed)',
    // Loopback only and nothing is relayed: no TLS and no sign-in needed.
    disabledCommands: ['STARTTLS', 'AUTH'],
    authOptional: true,
    size: maxBytes,
    logger: false,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => chunks.push(chunk));
      stream.on('error', (error) => callback(error));
      stream.on('end', () => {
        if ((stream as unknown as { sizeExceeded?: boolean }).sizeExceeded) {
          const error = new Error(`Message exceeds the ${maxBytes} byte limit`) as Error & { responseCode?: number };
          error.responseCode = 552;
          callback(error);
          return;
        }
        const raw = Buffer.concat(chunks);
        const envelopeFrom = session.envelope.mailFrom ? session.envelope.mailFrom.address : '';
        const envelopeTo = session.envelope.rcptTo.map((r) => r.address.toLowerCase());
        store(raw, envelopeFrom, envelopeTo).then(
          () => {
            stored += 1;
            callback();
          },
          (error: unknown) => {
            logger.error({ err: error }, 'local mail server could not store a message');
            const failure = new Error('Could not store the message') as Error & { responseCode?: number };
            failure.responseCode = 451;
            callback(failure);
          },
        );
      });
    },
  });

  async function store(raw: Buffer, envelopeFrom: string, envelopeTo: string[]): Promise<void> {
    const parsed = await simpleParser(raw, { skipImageLinks: true, skipTextToHtml: true });
    await db.insert(devMailbox).values({
      envelopeFrom,
      envelopeTo,
      fromHeader: addressText(parsed.from),
      toHeader: addressText(parsed.to),
      subject: parsed.subject ?? '',
      messageId: parsed.messageId ?? null,
      text: parsed.text ?? null,
      html: typeof parsed.html === 'string' ? parsed.html : null,
      raw: raw.toString('utf8'),
    });
  }

  server.on('error', (error) => logger.warn({ err: error }, 'local mail server error'));

  await new Promise<void>((resolve, reject) => {
    const onError = (error: Error) => reject(error);
    server.server.once('error', onError);
    server.listen(options.port ?? 0, host, () => {
      server.server.off('error', onError);
      resolve();
    });
  });
  const { port } = server.server.address() as AddressInfo;

  let closing: Promise<void> | undefined;
  return {
    host,
    port,
    url: `smtp://${host}:${port}`,
    received: () => stored,
    close: () => (closing ??= new Promise<void>((resolve) => server.close(() => resolve()))),
  };
}
