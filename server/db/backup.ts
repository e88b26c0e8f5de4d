/**
 * `npm run db:backup [file]` and `npm run db:restore [file] [--yes]`: a whole database to one file
 * and back, with Debian's pg_dump and pg_restore (custom format: compressed, restorable table by
 * table, readable by `pg_restore --list`).
 *
 * - The database is DATABASE_URL, or the development cluster (started if needed).
 * - Backups go to .data/backups/spreadproof-<database>-<UTC time>.dump unless a path is given.
 * - Restore reads the given file, or the newest file in .data/backups/. It replaces the objects
 *   in the dump (`--clean --if-exists`) in one transaction, so a failed restore changes nothing.
 *   A database that already holds worksheets is only overwritten with `--yes`. Stop the servers
 *   that use the database first.
 *
 * The password travels in PGPASSWORD, never on a command line (where `ps` would show it).
 */
import { execFile } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, renameSync, statSync } from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { promisify } from 'node:util';
import pg from 'pg';
import { dataDir } from '../paths';
import { databaseName } from './client';

const execFileAsync = promisify(execFile);

export const backupDir = path.join(dataDir, 'backups');

/**
 * pg_dump / pg_restore of the newest installed PostgreSQL (a dump tool must be at least as new as
 * the server), falling back to Debian's version-selecting wrappers in /usr/bin.
 */
export function pgTool(name: 'pg_dump' | 'pg_restore'): string {
  const base = '/usr/lib/postgresql';
  const majors = existsSync(base)
    ? readdirSync(base)
        .map(Number)
        .filter((major) => Number.isInteger(major) && existsSync(path.join(base, String(major), 'bin', name)))
        .sort((a, b) => b - a)
    : [];
  if (majors.length > 0) return path.join(base, String(majors[0]), 'bin', name);
  if (existsSync(`/usr/bin/${name}`)) return `/usr/bin/${name}`;
  throw new Error(`${name} was not found. Install it with:\n\n    sudo apt-get install -y postgresql-client\n`);
}

/** libpq connection settings of a URL, with the password split off for PGPASSWORD. */
function connection(url: string): { uri: string; env: NodeJS.ProcessEnv } {
  const parsed = new URL(url);
  const password = decodeURIComponent(parsed.password);
  parsed.password = '';
  const env: NodeJS.ProcessEnv = { ...process.env };
  if (password) env.PGPASSWORD = password;
  return { uri: parsed.toString(), env };
}

async function runTool(tool: string, args: string[], env: NodeJS.ProcessEnv): Promise<void> {
  try {
    await execFileAsync(tool, args, { env, maxBuffer: 16 * 1024 * 1024 });
  } catch (error) {
    const e = error as { stderr?: string; message: string };
    throw new Error(`${path.basename(tool)} failed: ${(e.stderr ?? '').trim() || e.message}`);
  }
}

export function defaultBackupFile(url: string, now = new Date()): string {
  const stamp = now.toISOString().replace(/[-:]/g, '').replace(/\.\d+Z$/, 'Z');
  const name = databaseName(url).replace(/[^A-Za-z0-9_-]/g, '_');
  return path.join(backupDir, `spreadproof-${name}-${stamp}.dump`);
}

/** Writes the whole database to `file` (custom format). Returns the file and its size. */
export async function backupDatabase(url: string, file = defaultBackupFile(url)): Promise<{ file: string; bytes: number }> {
  mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
  const { uri, env } = connection(url);
  // A partly written file must never look like a backup: write beside it, then rename.
  const partial = `${file}.partial`;
  await runTool(pgTool('pg_dump'), ['--format=custom', '--compress=6', '--no-owner', '--no-privileges', `--file=${partial}`, `--dbname=${uri}`], env);
  renameSync(partial, file);
  return { file, bytes: statSync(file).size };
}

/** The newest backup in .data/backups/, or null. */
export function latestBackup(dir = backupDir): string | null {
  if (!existsSync(dir)) return null;
  const files = readdirSync(dir)
    .filter((f) => f.endsWith('.dump'))
    .map((f) => path.join(dir, f))
    .sort((a, b) => statSync(b).mtimeMs - statSync(a).mtimeMs);
  return files[0] ?? null;
}

/** Worksheets in the target, or 0 when it has no worksheet table yet. */
export async function worksheetCount(url: string): Promise<number> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    const exists = await client.query("select to_regclass('public.worksheets') is not null as present");
    if (!exists.rows[0].present) return 0;
    const { rows } = await client.query<{ n: number }>('select count(*)::int as n from worksheets');
    return rows[0].n;
  } finally {
    await client.end();
  }
}

/** Replaces the objects of `file` in the database, in one transaction. */
export async function restoreDatabase(url: string, file: string): Promise<void> {
  if (!existsSync(file)) throw new Error(`There is no backup file at ${file}.`);
  const { uri, env } = connection(url);
  await runTool(
    pgTool('pg_restore'),
    ['--clean', '--if-exists', '--no-owner', '--no-privileges', '--single-transaction', '--exit-on-error', `--dbname=${uri}`, file],
    env,
  );
}

async function targetUrl(): Promise<string> {
  if (process.env.DATABASE_URL) return process.env.DATABASE_URL;
  const { devCluster, ensureCluster } = await import('./cluster');
  return (await ensureCluster(devCluster, (m) => console.log(m))).url;
}

/** A path as the user would type it: relative inside the project, absolute elsewhere. */
function shown(file: string): string {
  const relative = path.relative(process.cwd(), file);
  return relative && !relative.startsWith('..') ? relative : file;
}

function formatBytes(bytes: number): string {
  return bytes >= 1048576 ? `${(bytes / 1048576).toFixed(1)} MB` : `${(bytes / 1024).toFixed(1)} kB`;
}

async function main(argv: string[]): Promise<void> {
  const [command, ...rest] = argv;
  const yes = rest.includes('--yes');
  const fileArg = rest.find((a) => !a.startsWith('--'));
  const url = await targetUrl();
  if (command === 'backup') {
    const { file, bytes } = await backupDatabase(url, fileArg ? path.resolve(fileArg) : undefined);
    console.log(`Backed up database "${databaseName(url)}" to ${shown(file)} (${formatBytes(bytes)}).`);
    console.log('Restore it with: npm run db:restore -- <file>');
  } else if (command === 'restore') {
    const file = fileArg ? path.resolve(fileArg) : latestBackup();
    if (!file) throw new Error(`No backup file given and none in ${shown(backupDir)}/. Usage: npm run db:restore -- <file> [--yes]`);
    const present = await worksheetCount(url);
    if (present > 0 && !yes) {
      throw new Error(
        `Database "${databaseName(url)}" holds ${present} worksheet(s); restoring ${path.basename(file)} replaces them.\n` +
          'Stop the servers that use it, then run again with --yes:  npm run db:restore -- ' + (fileArg ?? '') + ' --yes',
      );
    }
    await restoreDatabase(url, file);
    console.log(`Restored ${shown(file)} into database "${databaseName(url)}" (now ${await worksheetCount(url)} worksheet(s)).`);
  } else {
    throw new Error('Usage: tsx server/db/backup.ts backup [file] | restore [file] [--yes]');
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  main(process.argv.slice(2)).catch((error) => {
    console.error(error instanceof Error ? error.message : error);
    process.exit(1);
  });
}
