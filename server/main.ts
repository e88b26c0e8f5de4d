/**
 * Listens: `tsx server/main.ts` serves the API (and the built client, if any) on 127.0.0.1:PORT
 * using DATABASE_URL or the project cluster, after applying pending migrations. `npm start`
 * (server/start.ts) adds seeding and the client build in front of the same `serve()`.
 * With PORT=0 the system picks a free port; the "listening on" line names it.
 */
import type { AddressInfo } from 'node:net';
import { pathToFileURL } from 'node:url';
import http from 'node:http';
import connectPgSimple from 'connect-pg-simple';
import session from 'express-session';
import { createApp } from './app';
import type { AnswerCache } from './http/answer-cache';
import { clientBuildExists } from './client-build';
import { authRateLimitFromEnv, configuredPort, host, isProduction, sessionSecret } from './config';
import { openDatabase, type DatabaseHandle } from './db/client';
import { devCluster, ensureCluster } from './db/cluster';
import { runMigrations } from './db/migrate';
import { createLogger } from './log';
import { startMail } from './mail/index';
import { clientBrowserDir } from './paths';

export const listeningPrefix = 'Spreadproof listening on ';

/** DATABASE_URL when set, otherwise the development cluster (created and started as needed). */
export async function resolveDatabaseUrl(log: (message: string) => void): Promise<string> {
  if (process.env.DATABASE_URL) return process.env.DATABASE_URL;
  return (await ensureCluster(devCluster, log)).url;
}

export async function openMigrated(url: string): Promise<DatabaseHandle> {
  const handle = openDatabase(url);
  try {
    await runMigrations(handle.db);
  } catch (error) {
    await handle.close();
    throw error;
  }
  return handle;
}

export interface ServeOptions {
  database: DatabaseHandle;
  port?: number;
  clientDir?: string | null;
  /** Printed after the URL, once listening. */
  banner?: string;
}

export async function serve(options: ServeOptions): Promise<{ url: string; close(): Promise<void> }> {
  const logger = createLogger();
  const { db, pool } = options.database;
  const store = new (connectPgSimple(session))({ pool, tableName: 'session', createTableIfMissing: false, pruneSessionInterval: 15 * 60 });
  // Mail: SMTP_URL, or the local mail server; the sender delivers the outbox in the background.
  const { mail, description: mailDescription } = await startMail({ db, logger });
  const app = createApp({
    mail,
    db,
    pool,
    logger,
    sessionSecret: sessionSecret(),
    production: isProduction(),
    clientDir: options.clientDir === undefined ? (clientBuildExists() ? clientBrowserDir : null) : options.clientDir,
    sessionStore: store,
    authRateLimit: authRateLimitFromEnv(),
  });

  // A fresh published answer leaves from memory before Express sees the request (server/app.ts
  // keeps the same check as its first middleware for in-process use).
  const publishedAnswers = app.locals.publishedAnswers as AnswerCache | undefined;
  const server = http.createServer((req, res) => {
    if (!publishedAnswers?.handle(req, res)) app(req, res);
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(options.port ?? configuredPort(), host, () => resolve());
  });
  const { port } = server.address() as AddressInfo;
  const url = `http://${host}:${port}`;
  mail.useBaseUrl(url);
  console.log(`${listeningPrefix}${url}`);
  console.log(mailDescription);
  if (options.banner) console.log(options.banner);

  let closing: Promise<void> | undefined;
  const close = () =>
    (closing ??= (async () => {
      await new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeIdleConnections();
        // Requests still running after a grace period are cut rather than holding the shutdown.
        setTimeout(() => server.closeAllConnections(), 3000).unref();
      });
      store.close();
      await mail.close();
      await options.database.close();
    })());

  for (const signal of ['SIGINT', 'SIGTERM'] as const) {
    process.once(signal, () => {
      console.log(`\n${signal === 'SIGINT' ? 'Ctrl-C' : signal}: stopping the server…`);
      close().then(
        () => {
          console.log('Server stopped. (The PostgreSQL cluster keeps running; `npm run db:stop` stops it.)');
          process.exit(0);
        },
        (error) => {
          console.error('Error during shutdown:', error);
          process.exit(1);
        },
      );
    });
  }
  return { url, close };
}

async function main(): Promise<void> {
  const url = await resolveDatabaseUrl((m) => console.log(m));
  const database = await openMigrated(url);
  await serve({ database });
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  main().catch((error) => {
    console.error(error instanceof Error ? error.message : error);
    process.exit(1);
  });
}
