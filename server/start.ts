/**
 * `npm start`: database (DATABASE_URL or the project cluster) → migrations → demo seed → client
 * build if stale → listen on 127.0.0.1:4300 (PORT overrides) → print the URL and demo sign-ins.
 */
import { ensureClientBuild } from './client-build';
import { databaseName } from './db/client';
import { demoCompany, demoPassword, demoTeamName, demoUsers, seedDemo } from './db/seed';
import { openMigrated, resolveDatabaseUrl, serve } from './main';
import { configuredPort, host, sessionSecret } from './config';
import { seedDemoWorksheets } from './seed/worksheets';

const log = (message: string) => console.log(message);

try {
  const url = await resolveDatabaseUrl(log);
  const database = await openMigrated(url);
  log(`Database "${databaseName(url)}" is migrated.`);
  const people = await seedDemo(database.db);
  const demoWorksheets = await seedDemoWorksheets(database.db, people, { linkSecret: sessionSecret() });
  if (demoWorksheets.created.length > 0) log(`Demo worksheets added: ${demoWorksheets.created.join('; ')}.`);
  const clientDir = await ensureClientBuild(log);
  if (!clientDir) log('No client build yet (client/src/main.ts is missing): / serves a plain message.');

  const width = Math.max(...demoUsers.map((u) => u.email.length));
  const banner = [
    '',
    `Demo sign-ins (${demoCompany}, team "${demoTeamName}"), password "${demoPassword}" for all:`,
    ...demoUsers.map((u) => `  ${u.email.padEnd(width)}  ${u.role.padEnd(8)}  ${u.part}`),
    '',
    demoWorksheets.publishedPath
      ? `Published demo worksheet (no sign-in): ${configuredPort() === 0 ? '' : `http://${host}:${configuredPort()}`}${demoWorksheets.publishedPath}`
      : 'The published demo link has been revoked.',
    '',
    'Ctrl-C stops the server; `npm run db:stop` stops the database cluster.',
  ].join('\n');
  await serve({ database, clientDir, banner });
} catch (error) {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
}
