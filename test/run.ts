/**
 * `npm test`: PostgreSQL (installing Debian's package as root when missing) → type-checks → mocha
 * over test/**\/*.test.ts except test/browser, on a fresh database → fresh client build → browser
 * suites in test/browser → one closing line `N passed, N failed, N skipped`; exit status 1 on any
 * failure.
 */
import { spawn } from 'node:child_process';
import { existsSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { buildClient, clientBuildIsFresh, clientSourcesExist } from '../server/client-build';
import { aptInstall, ClusterError, ensureCluster, testCluster } from '../server/db/cluster';
import { projectRoot } from '../server/paths';
import { adminUrlVariable, createTestDatabase, dropStaleTestDatabases, testRunVariable } from './support/db';

const totals = { passed: 0, failed: 0, skipped: 0 };
const log = (message: string) => console.log(message);
const heading = (title: string) => console.log(`\n── ${title} ${'─'.repeat(Math.max(0, 70 - title.length))}`);
const bin = (name: string) => path.join(projectRoot, 'node_modules', '.bin', name);
const isRoot = process.getuid?.() === 0;

function run(command: string, args: string[], env: NodeJS.ProcessEnv = process.env): Promise<number> {
  return new Promise((resolve) => {
    const child = spawn(command, args, { cwd: projectRoot, stdio: ['ignore', 'inherit', 'inherit'], env });
    child.once('error', (error) => {
      console.error(`${command}: ${error.message}`);
      resolve(127);
    });
    child.once('exit', (code, signal) => resolve(code ?? (signal ? 128 : 1)));
  });
}

/** Test files under `dir` (recursively), relative to the project root. */
function testFiles(dir: string, exclude: string[] = []): string[] {
  const root = path.join(projectRoot, dir);
  if (!existsSync(root)) return [];
  const found: string[] = [];
  const walk = (current: string) => {
    for (const entry of readdirSync(current, { withFileTypes: true })) {
      const full = path.join(current, entry.name);
      const relative = path.relative(projectRoot, full);
      if (exclude.some((prefix) => relative === prefix || relative.startsWith(`${prefix}${path.sep}`))) continue;
      if (entry.isDirectory()) walk(full);
      else if (entry.name.endsWith('.test.ts')) found.push(relative);
    }
  };
  walk(root);
  return found.sort();
}

async function mocha(label: string, files: string[], env: NodeJS.ProcessEnv, timeoutMs: number): Promise<void> {
  const countsFile = path.join(os.tmpdir(), `spreadproof-counts-${process.pid}-${label}.json`);
  rmSync(countsFile, { force: true });
  const code = await run(
    bin('mocha'),
    ['--import=tsx', '--reporter', path.join('test', 'support', 'count-reporter.cjs'), '--timeout', String(timeoutMs), '--exit', ...files],
    { ...env, SPREADPROOF_COUNTS_FILE: countsFile },
  );
  if (existsSync(countsFile)) {
    const counts = JSON.parse(readFileSync(countsFile, 'utf8')) as typeof totals;
    rmSync(countsFile, { force: true });
    totals.passed += counts.passed;
    totals.failed += counts.failed;
    totals.skipped += counts.skipped;
    // Mocha failing without a failed test (a file that does not load, say) still fails the run.
    if (code !== 0 && counts.failed === 0) totals.failed += 1;
  } else if (code !== 0) {
    console.error(`mocha (${label}) stopped before reporting (exit ${code}).`);
    totals.failed += 1;
  }
}

async function typeCheck(project: string): Promise<void> {
  log(`tsc -p ${project}`);
  const code = await run(bin('tsc'), ['-p', project, '--noEmit']);
  if (code !== 0) {
    console.error(`Type-check of ${project} failed.`);
    totals.failed += 1;
  }
}

async function ensureChromium(): Promise<boolean> {
  if (existsSync('/usr/bin/chromium')) return true;
  if (!isRoot) {
    console.error('Chromium is needed for the browser tests. Install it with:\n\n    sudo apt-get install -y chromium\n');
    return false;
  }
  await aptInstall(['chromium'], log);
  return existsSync('/usr/bin/chromium');
}

async function main(): Promise<void> {
  heading('PostgreSQL');
  let admin: string;
  if (process.env.DATABASE_URL) {
    admin = process.env.DATABASE_URL;
    log('Using the server named by DATABASE_URL for test databases.');
  } else {
    admin = (await ensureCluster(testCluster, log)).url;
    log(`Test cluster on 127.0.0.1:${testCluster.port}.`);
  }
  process.env[adminUrlVariable] = admin;
  const stale = await dropStaleTestDatabases();
  if (stale.length > 0) log(`Dropped ${stale.length} test database(s) left by earlier runs.`);

  heading('Type-check');
  await typeCheck('tsconfig.server.json');
  if (clientSourcesExist()) await typeCheck(path.join('client', 'tsconfig.app.json'));
  else log('client/src/main.ts does not exist yet: client type-check skipped.');
  if (existsSync(path.join('test', 'client', 'tsconfig.json'))) await typeCheck(path.join('test', 'client', 'tsconfig.json'));

  heading('Unit, engine and API suites');
  const files = testFiles('test', [path.join('test', 'browser')]);
  if (files.length > 0) {
    const database = await createTestDatabase();
    try {
      await mocha('main', files, { ...process.env, DATABASE_URL: database.url, [testRunVariable]: '1' }, 60000);
    } finally {
      await database.drop();
    }
  } else {
    log('No test files found.');
  }

  const browserFiles = testFiles(path.join('test', 'browser'));
  if (browserFiles.length > 0) {
    heading('Browser suites');
    if (!(await ensureChromium())) {
      totals.failed += 1;
    } else if (!clientSourcesExist()) {
      console.error('Browser suites exist but client/src/main.ts does not: nothing to test against.');
      totals.failed += 1;
    } else {
      let built = true;
      if (await clientBuildIsFresh()) log('Client build is up to date.');
      else {
        try {
          await buildClient(log);
        } catch (error) {
          console.error((error as Error).message);
          totals.failed += 1;
          built = false;
        }
      }
      if (built) {
        const env = { ...process.env };
        // Browser suites start their own servers on their own databases (test/support/server.ts).
        delete env.DATABASE_URL;
        await mocha('browser', browserFiles, { ...env, [testRunVariable]: '1' }, 60000);
      }
    }
  }
}

try {
  await main();
} catch (error) {
  console.error(error instanceof ClusterError || error instanceof Error ? error.message : error);
  totals.failed += 1;
}
console.log('');
const skipped = totals.skipped > 0 ? `, ${totals.skipped} skipped` : '';
console.log(`${totals.passed} passed, ${totals.failed} failed${skipped}`);
process.exit(totals.failed > 0 ? 1 : 0);
