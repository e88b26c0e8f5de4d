/**
 * `npm run fuzz [-- --seed N] [-- --documents N --uploads N --hostile N]`: the fuzz suites of
 * test/fuzz at full size — 10,000 worksheet documents against the draft-evaluation and save
 * routes, 2,000 uploads, 1,000 hostile notes — on a fresh database of the test cluster, seeded
 * (the same seed as `npm test`'s smaller sample unless one is given, so a failure repeats).
 * Ends with the mocha summary and the wall time.
 */
import { spawn } from 'node:child_process';
import path from 'node:path';
import { ensureCluster, testCluster } from '../../server/db/cluster';
import { projectRoot } from '../../server/paths';
import { adminUrlVariable, createTestDatabase, testRunVariable } from '../support/db';

function option(name: string, fallback: number): number {
  const at = process.argv.indexOf(`--${name}`);
  const value = at >= 0 ? Number(process.argv[at + 1]) : NaN;
  return Number.isInteger(value) && value > 0 ? value : fallback;
}

const sizes = {
  SPREADPROOF_FUZZ_DOCUMENTS: option('documents', 10_000),
  SPREADPROOF_FUZZ_UPLOADS: option('uploads', 2_000),
  SPREADPROOF_FUZZ_HOSTILE: option('hostile', 1_000),
  SPREADPROOF_FUZZ_SEED: option('seed', 20_251_201),
};

const admin = process.env.DATABASE_URL ?? (await ensureCluster(testCluster, (m) => console.log(m))).url;
process.env[adminUrlVariable] = admin;
const database = await createTestDatabase();
console.log(`Fuzzing with ${Object.entries(sizes).map(([k, v]) => `${k.replace('SPREADPROOF_FUZZ_', '').toLowerCase()} ${v}`).join(', ')}.`);
const started = Date.now();
const code = await new Promise<number>((resolve) => {
  const child = spawn(
    path.join(projectRoot, 'node_modules', '.bin', 'mocha'),
    ['--import=tsx', '--timeout', String(6 * 3600 * 1000), '--exit', 'test/fuzz/*.test.ts'],
    {
      cwd: projectRoot,
      stdio: 'inherit',
      env: { ...process.env, ...Object.fromEntries(Object.entries(sizes).map(([k, v]) => [k, String(v)])), DATABASE_URL: database.url, [testRunVariable]: '1' },
    },
  );
  child.once('exit', (exitCode) => resolve(exitCode ?? 1));
});
await database.drop();
console.log(`Fuzz run finished in ${((Date.now() - started) / 60000).toFixed(1)} min, exit status ${code}.`);
process.exit(code);
