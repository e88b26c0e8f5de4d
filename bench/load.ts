/**
 * `npm run load [-- --clients 100] [-- --seconds 30] [-- --cluster test] [-- --profile]`: the load
 * script. `--profile` writes CPU profiles of the server process and its evaluation threads to
 * test-output/profiles/ (open them in Chromium's DevTools, Performance panel).
 *
 * Starts a real server process (server/main.ts) on a fresh, seeded database on loopback
 * (bench/support/servers.ts: the development cluster with PostgreSQL's durable defaults unless
 * `--cluster test`), signs in `--clients` clients (100 by default), each with its own session and
 * its own worksheet, and lets every client run a closed loop for `--seconds` (30 by default) with
 * no pause between requests, choosing each request at random (seeded, so runs repeat):
 *
 *   40 % reads      the worksheet list, the client's worksheet with its head, one of its revisions,
 *                   its timeline, and a published link (the same link for all, as readers share one)
 *   30 % drafts     POST …/evaluate of a new 20-step document (the editor's live preview)
 *   30 % saves      POST …/revisions of a new 20-step document on the client's own head
 *
 * Every answer must be the expected one (200, or 201 for saves): anything else, or a failed
 * connection, is an error and is printed. Each acknowledged save (201) is remembered with its
 * revision id, number and hashes; after the run every one is read back through the API (document
 * and results hashes recomputed from the canonical JSON of the answer, test/reliability/support.ts) and counted
 * in the database, which must hold exactly the acknowledged revisions and no others.
 *
 * Prints requests per second and p50 / p95 / p99 latency per kind, errors and lost saves, and
 * writes them to test-output/load.json. Exit status 1 on any error or lost save; no time is
 * asserted (the figures are read, not tested).
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { projectRoot } from '../server/paths';
import { hashesOfAnswer } from '../test/reliability/support';
import { exampleDocuments, prng, twentyStepDocument } from './support/documents';
import { benchServer, clusterChoice, useCluster } from './support/servers';
import { demoEditor, demoOwner, SessionClient, type Answer } from './support/session-client';
import { ms, peakRss, summary } from './support/stats';

function option(name: string, fallback: number): number {
  const at = process.argv.indexOf(`--${name}`);
  if (at < 0) return fallback;
  const value = Number(process.argv[at + 1]);
  if (!Number.isInteger(value) || value < 1) {
    console.error(`--${name} needs a whole number ≥ 1 (got ${process.argv[at + 1] ?? 'nothing'}).`);
    process.exit(2);
  }
  return value;
}

const clientCount = option('clients', 100);
const seconds = option('seconds', 30);

type Kind = 'list' | 'worksheet' | 'revision' | 'timeline' | 'published' | 'draft' | 'save';
const kinds: Kind[] = ['list', 'worksheet', 'revision', 'timeline', 'published', 'draft', 'save'];

interface Saved {
  id: string;
  number: number;
  contentHash: string;
  resultsHash: string;
}

interface LoadClient {
  client: SessionClient;
  worksheetId: string;
  head: string;
  saved: Saved[];
  random: () => number;
  seed: number;
}

const latencies = new Map<Kind, number[]>(kinds.map((k) => [k, []]));
const errors: string[] = [];

async function timed(kind: Kind, expected: number, run: () => Promise<Answer>): Promise<Answer | null> {
  const started = performance.now();
  let answer: Answer;
  try {
    answer = await run();
  } catch (error) {
    errors.push(`${kind}: connection failed: ${(error as Error).message}`);
    return null;
  }
  latencies.get(kind)!.push(performance.now() - started);
  if (answer.status !== expected) {
    errors.push(`${kind}: expected ${expected}, got ${answer.status} ${answer.text.slice(0, 200)}`);
    return null;
  }
  return answer;
}

async function step(c: LoadClient, publicToken: string): Promise<void> {
  const r = c.random();
  if (r < 0.4) {
    const which = Math.floor((r / 0.4) * 5);
    if (which === 0) await timed('list', 200, () => c.client.get('/api/worksheets?pageSize=20'));
    else if (which === 1) await timed('worksheet', 200, () => c.client.get(`/api/worksheets/${c.worksheetId}`));
    else if (which === 2) {
      const pick = c.saved.length > 0 ? c.saved[Math.floor(c.random() * c.saved.length)].id : c.head;
      await timed('revision', 200, () => c.client.get(`/api/revisions/${pick}`));
    } else if (which === 3) await timed('timeline', 200, () => c.client.get(`/api/worksheets/${c.worksheetId}/revisions`));
    else await timed('published', 200, () => c.client.get(`/api/public/${publicToken}`));
    return;
  }
  c.seed += 1;
  const document = twentyStepDocument(c.seed, `Load study ${c.seed}`);
  if (r < 0.7) {
    await timed('draft', 200, () => c.client.post(`/api/worksheets/${c.worksheetId}/evaluate`, { document }));
    return;
  }
  const answer = await timed('save', 201, () => c.client.post(`/api/worksheets/${c.worksheetId}/revisions`, { baseRevisionId: c.head, document, message: `load ${c.seed}` }));
  if (answer) {
    const rev = answer.body.revision;
    c.saved.push({ id: rev.id, number: rev.number, contentHash: rev.contentHash, resultsHash: rev.resultsHash });
    c.head = rev.id;
  }
}

/** Reads every acknowledged save back (API and database); returns the lost or damaged ones. */
async function verify(clients: LoadClient[], databaseUrl: string): Promise<{ checked: number; problems: string[] }> {
  const problems: string[] = [];
  let checked = 0;
  // Through the API, eight at a time: the stored text must hash to the acknowledged hashes.
  const all = clients.flatMap((c) => c.saved.map((s) => ({ c, s })));
  for (let i = 0; i < all.length; i += 8) {
    await Promise.all(
      all.slice(i, i + 8).map(async ({ c, s }) => {
        const res = await c.client.get(`/api/revisions/${s.id}`);
        if (res.status !== 200) {
          problems.push(`revision ${s.id} (#${s.number}) answered ${res.status}`);
          return;
        }
        const got = hashesOfAnswer(res.body.revision);
        if (got.contentHash !== s.contentHash || got.resultsHash !== s.resultsHash) problems.push(`revision ${s.id} (#${s.number}): stored text does not hash to the acknowledged hashes`);
        checked += 1;
      }),
    );
  }
  // In the database: exactly the acknowledged revisions (plus each worksheet's first), numbered 1…k.
  const db = new pg.Client({ connectionString: databaseUrl });
  await db.connect();
  try {
    for (const c of clients) {
      const { rows } = await db.query<{ id: string; number: number; content_hash: string; results_hash: string }>(
        'select id, number, content_hash, results_hash from revisions where worksheet_id = $1 order by number',
        [c.worksheetId],
      );
      const stored = new Map(rows.map((r) => [r.id, r]));
      for (const s of c.saved) {
        const row = stored.get(s.id);
        if (!row) problems.push(`acknowledged revision ${s.id} (#${s.number}) is not in the database`);
        else if (row.content_hash !== s.contentHash || row.results_hash !== s.resultsHash || row.number !== s.number) problems.push(`revision ${s.id}: stored row differs from the acknowledgement`);
      }
      if (rows.length !== c.saved.length + 1) problems.push(`worksheet ${c.worksheetId}: ${rows.length} revisions stored, ${c.saved.length + 1} expected`);
      if (rows.some((r, i) => r.number !== i + 1)) problems.push(`worksheet ${c.worksheetId}: revision numbers are not 1…${rows.length}`);
    }
  } finally {
    await db.end();
  }
  return { checked, problems };
}

console.log(`Spreadproof load: ${clientCount} clients × ${seconds} s on ${os.cpus().length} CPU(s), load average ${os.loadavg().map((l) => l.toFixed(1)).join(' ')}, Node ${process.version}.`);
console.log(`Database: ${await useCluster(clusterChoice())}.`);
const profile = process.argv.includes('--profile');
const profileDir = path.join(projectRoot, 'test-output', 'profiles');
if (profile) mkdirSync(profileDir, { recursive: true });
const server = await benchServer({}, profile ? ['--cpu-prof', `--cpu-prof-dir=${profileDir}`] : []);
let failed = true;
try {
  // A published link everyone reads.
  const owner = new SessionClient(server.url);
  await owner.signIn(demoOwner.email, demoOwner.password);
  const teamId = (await owner.get('/api/teams')).body.teams[0].id as string;
  const shared = SessionClient.expect(await owner.post(`/api/teams/${teamId}/worksheets`, { source: 'blank', title: 'Load: published bore gauge' }), 201, 'create');
  const sharedSave = SessionClient.expect(
    await owner.post(`/api/worksheets/${shared.body.worksheet.id}/revisions`, { baseRevisionId: shared.body.head.id, document: exampleDocuments()['bore-gauge-repeatability.json'] }),
    201,
    'save',
  );
  const publicToken = SessionClient.expect(await owner.post(`/api/revisions/${sharedSave.body.revision.id}/links`, {}), 201, 'publish').body.token as string;

  // The clients: each signs in (its own session) and gets a worksheet of its own.
  const setupStarted = performance.now();
  const clients: LoadClient[] = [];
  for (let i = 0; i < clientCount; i += 10) {
    const batch = await Promise.all(
      Array.from({ length: Math.min(10, clientCount - i) }, async (_, k) => {
        const n = i + k;
        const client = new SessionClient(server.url);
        await client.signIn(demoEditor.email, demoEditor.password);
        const created = SessionClient.expect(await client.post(`/api/teams/${teamId}/worksheets`, { source: 'blank', title: `Load client ${n + 1}` }), 201, 'create');
        return { client, worksheetId: created.body.worksheet.id, head: created.body.head.id, saved: [], random: prng(7919 * (n + 1)), seed: 1_000_000 * (n + 1) } as LoadClient;
      }),
    );
    clients.push(...batch);
  }
  console.log(`Set-up: ${clientCount} clients signed in, each with a worksheet, in ${((performance.now() - setupStarted) / 1000).toFixed(1)} s.`);

  const started = performance.now();
  const deadline = started + seconds * 1000;
  await Promise.all(
    clients.map(async (c) => {
      while (performance.now() < deadline) await step(c, publicToken);
    }),
  );
  const wall = (performance.now() - started) / 1000;

  const total = kinds.reduce((s, k) => s + latencies.get(k)!.length, 0);
  console.log(`\nRun: ${total} requests in ${wall.toFixed(1)} s = ${(total / wall).toFixed(0)} requests/s over ${clientCount} clients.`);
  console.log(`${'kind'.padEnd(10)} ${'requests'.padStart(8)} ${'per s'.padStart(7)} ${'p50'.padStart(9)} ${'p95'.padStart(9)} ${'p99'.padStart(9)} ${'max'.padStart(9)}`);
  const perKind: Record<string, unknown> = {};
  for (const k of kinds) {
    const s = summary(latencies.get(k)!);
    perKind[k] = { ...s, perSecond: s.n / wall };
    console.log(`${k.padEnd(10)} ${String(s.n).padStart(8)} ${(s.n / wall).toFixed(1).padStart(7)} ${ms(s.p50).padStart(9)} ${ms(s.p95).padStart(9)} ${ms(s.p99).padStart(9)} ${ms(s.max).padStart(9)}`);
  }
  const acknowledged = clients.reduce((s, c) => s + c.saved.length, 0);
  console.log(`Errors: ${errors.length}.`);
  for (const e of errors.slice(0, 20)) console.log(`  ${e}`);

  const verifyStarted = performance.now();
  const { checked, problems } = await verify(clients, server.databaseUrl);
  console.log(
    `Acknowledged saves: ${acknowledged}; read back with matching hashes: ${checked}; lost or damaged: ${problems.length} ` +
      `(checked in ${((performance.now() - verifyStarted) / 1000).toFixed(1)} s).`,
  );
  for (const p of problems.slice(0, 20)) console.log(`  ${p}`);
  const serverPeak = await peakRss(server.pid);
  if (serverPeak !== null) console.log(`Server process peak RSS: ${(serverPeak / (1024 * 1024)).toFixed(0)} MB.`);

  mkdirSync(path.join(projectRoot, 'test-output'), { recursive: true });
  writeFileSync(
    path.join(projectRoot, 'test-output', 'load.json'),
    `${JSON.stringify({ date: new Date().toISOString(), clients: clientCount, seconds: wall, cluster: clusterChoice(), cpus: os.cpus().length, requests: total, requestsPerSecond: total / wall, perKind, errors: errors.length, acknowledgedSaves: acknowledged, lostSaves: problems.length, serverPeakRssBytes: serverPeak }, null, 2)}\n`,
  );
  failed = errors.length > 0 || problems.length > 0;
  console.log(failed ? '\nLoad run FAILED: see the errors above.' : '\nLoad run passed: 0 errors, 0 lost acknowledged saves.');
} finally {
  await server.stop();
}
process.exit(failed ? 1 : 0);
