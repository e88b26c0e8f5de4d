/**
 * `npm run bench [-- --only a,b,c,d,e] [-- --cluster test]`: the service's benchmarks. Each prints
 * its figures; none asserts a time (speed targets are read, not tested). Each server benchmark
 * starts its own server process on a fresh database on loopback (bench/support/servers.ts).
 *
 *   a  the engine against its floor: `npm run bench:engine` (bench/engine.ts)
 *   b  requests per second of the published-view route (GET /api/public/:token) against a bare
 *      node:http server answering the same bytes; autocannon, 50 connections, 10 s each, two
 *      alternating rounds. Target: at least 50 %.
 *   c  latency (p50 / p95 / p99) of saving a 20-step revision with 20 concurrent clients: new
 *      documents (evaluated by the save), and documents the client evaluated as a draft first
 *      (the editor's live preview does this), so the save finds the results in the cache.
 *   d  the client's initial JavaScript, gzip: the scripts and module preloads named by
 *      dist/client/browser/index.html (built if missing or stale).
 *   e  database bytes of 1,000 revisions of one worksheet that uses one 1 MB dataset, against the
 *      size of the dataset (pg_total_relation_size over every table, TOAST and indexes included).
 *
 * The figures are also written to test-output/bench.json.
 */
import { spawn } from 'node:child_process';
import { mkdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import autocannon from 'autocannon';
import pg from 'pg';
import { ensureClientBuild } from '../server/client-build';
import { clientBrowserDir, projectRoot } from '../server/paths';
import { datasetDocument, exampleDocuments, twentyStepDocument } from './support/documents';
import { bareServer, benchServer, clusterChoice, useCluster } from './support/servers';
import { demoEditor, demoOwner, SessionClient } from './support/session-client';
import { formatBytes, ms, summary } from './support/stats';

const onlyArg = process.argv.indexOf('--only');
const selected = new Set((onlyArg >= 0 ? process.argv[onlyArg + 1] : 'a,b,c,d,e').split(',').map((s) => s.trim()));
const figures: Record<string, unknown> = { date: new Date().toISOString(), machine: { cpus: os.cpus().length, loadAverage: os.loadavg().map((l) => Number(l.toFixed(2))), node: process.version } };
const heading = (title: string) => console.log(`\n── ${title} ${'─'.repeat(Math.max(0, 76 - title.length))}`);

// --- a ------------------------------------------------------------------------------------------

async function engineBench(): Promise<void> {
  heading('a  engine against its floor (npm run bench:engine)');
  const code = await new Promise<number>((resolve) => {
    const child = spawn('npm', ['run', '--silent', 'bench:engine'], { cwd: projectRoot, stdio: 'inherit' });
    child.once('exit', (c) => resolve(c ?? 1));
    child.once('error', () => resolve(127));
  });
  figures.engine = { exitCode: code, note: 'figures printed above by bench/engine.ts' };
  if (code !== 0) console.log(`bench:engine exited with ${code}.`);
}

// --- b ------------------------------------------------------------------------------------------

async function publishedBench(): Promise<void> {
  heading('b  published view against a bare node:http server (autocannon, 50 connections, 10 s)');
  const server = await benchServer();
  try {
    const owner = new SessionClient(server.url);
    await owner.signIn(demoOwner.email, demoOwner.password);
    const teamId = (await owner.get('/api/teams')).body.teams[0].id;
    const created = SessionClient.expect(await owner.post(`/api/teams/${teamId}/worksheets`, { source: 'blank', title: 'Published bench' }), 201, 'create');
    const document = exampleDocuments()['bore-gauge-repeatability.json'];
    const saved = SessionClient.expect(await owner.post(`/api/worksheets/${created.body.worksheet.id}/revisions`, { baseRevisionId: created.body.head.id, document }), 201, 'save');
    const { token } = SessionClient.expect(await owner.post(`/api/revisions/${saved.body.revision.id}/links`, {}), 201, 'publish').body;
    const route = `/api/public/${token}`;
    const sample = await fetch(server.url + route);
    const body = Buffer.from(await sample.arrayBuffer());
    const bare = await bareServer(body, sample.headers.get('content-type') ?? 'application/json');
    try {
      const check = Buffer.from(await (await fetch(bare.url + route)).arrayBuffer());
      if (!check.equals(body)) throw new Error('the bare server does not answer the same bytes');
      console.log(`Response: ${formatBytes(body.length)} of JSON (the bore-gauge example revision).`);
      // Warm both up (JIT, connection pool, caches) before measuring.
      await autocannon({ url: server.url + route, connections: 10, duration: 2 });
      await autocannon({ url: bare.url + route, connections: 10, duration: 2 });
      const rounds: { app: number; bare: number; appP50: number; appP99: number; bareP50: number; bareP99: number; non2xx: number; errors: number }[] = [];
      for (let round = 0; round < 2; round++) {
        const app = await autocannon({ url: server.url + route, connections: 50, duration: 10 });
        const floor = await autocannon({ url: bare.url + route, connections: 50, duration: 10 });
        rounds.push({
          app: app.requests.average,
          bare: floor.requests.average,
          appP50: app.latency.p50,
          appP99: app.latency.p99,
          bareP50: floor.latency.p50,
          bareP99: floor.latency.p99,
          non2xx: app.non2xx,
          errors: app.errors + app.timeouts,
        });
        console.log(
          `round ${round + 1}: app ${app.requests.average.toFixed(0)} req/s (p50 ${app.latency.p50} ms, p99 ${app.latency.p99} ms, non-2xx ${app.non2xx}, errors ${app.errors + app.timeouts}); ` +
            `bare ${floor.requests.average.toFixed(0)} req/s (p50 ${floor.latency.p50} ms, p99 ${floor.latency.p99} ms)`,
        );
      }
      const appTotal = rounds.reduce((s, r) => s + r.app, 0);
      const bareTotal = rounds.reduce((s, r) => s + r.bare, 0);
      const ratio = appTotal / bareTotal;
      console.log(`Published view: ${(appTotal / rounds.length).toFixed(0)} req/s, bare node:http ${(bareTotal / rounds.length).toFixed(0)} req/s → ${(ratio * 100).toFixed(1)} % (target ≥ 50 %).`);
      figures.published = { responseBytes: body.length, rounds, appRequestsPerSecond: appTotal / rounds.length, bareRequestsPerSecond: bareTotal / rounds.length, ratio };
    } finally {
      await bare.close();
    }
  } finally {
    await server.stop();
  }
}

// --- c ------------------------------------------------------------------------------------------

async function saveBench(): Promise<void> {
  heading('c  saving a 20-step revision, 20 concurrent clients');
  const server = await benchServer();
  try {
    const clients: { client: SessionClient; worksheetId: string; head: string }[] = [];
    const first = new SessionClient(server.url);
    await first.signIn(demoEditor.email, demoEditor.password);
    const teamId = (await first.get('/api/teams')).body.teams[0].id;
    for (let c = 0; c < 20; c++) {
      const client = new SessionClient(server.url);
      await client.signIn(demoEditor.email, demoEditor.password);
      const created = SessionClient.expect(await client.post(`/api/teams/${teamId}/worksheets`, { source: 'blank', title: `Save bench ${c}` }), 201, 'create');
      clients.push({ client, worksheetId: created.body.worksheet.id, head: created.body.head.id });
    }
    let errors = 0;
    const save = async (c: (typeof clients)[number], seed: number, draftFirst: boolean): Promise<number | null> => {
      const document = twentyStepDocument(seed, `Save bench ${seed}`);
      if (draftFirst) SessionClient.expect(await c.client.post(`/api/worksheets/${c.worksheetId}/evaluate`, { document }), 200, 'draft');
      const started = performance.now();
      const res = await c.client.post(`/api/worksheets/${c.worksheetId}/revisions`, { baseRevisionId: c.head, document, message: `bench ${seed}` });
      const elapsed = performance.now() - started;
      if (res.status !== 201) {
        errors += 1;
        console.log(`save answered ${res.status}: ${res.text.slice(0, 200)}`);
        return null;
      }
      c.head = res.body.revision.id;
      return elapsed;
    };
    // Warm-up: one save per client (worker threads start, JIT), not counted.
    await Promise.all(clients.map((c, i) => save(c, 100_000 + i, false)));
    const phases: Record<string, number[]> = { cold: [], warm: [] };
    for (const [phase, draftFirst] of [['cold', false], ['warm', true]] as const) {
      const started = performance.now();
      await Promise.all(
        clients.map(async (c, i) => {
          for (let k = 0; k < 8; k++) {
            const t = await save(c, (phase === 'cold' ? 200_000 : 300_000) + i * 100 + k, draftFirst);
            if (t !== null) phases[phase].push(t);
          }
        }),
      );
      const wall = (performance.now() - started) / 1000;
      const s = summary(phases[phase]);
      console.log(
        `${phase === 'cold' ? 'new documents (evaluated by the save)' : 'after a draft evaluation (results cached)'}: ` +
          `${s.n} saves, p50 ${ms(s.p50)}, p95 ${ms(s.p95)}, p99 ${ms(s.p99)}, max ${ms(s.max)}; ${(s.n / wall).toFixed(1)} saves/s`,
      );
      figures[`saves_${phase}`] = { ...s, savesPerSecond: s.n / wall };
    }
    console.log(`Errors: ${errors}.`);
    (figures.saves_cold as Record<string, unknown>).errors = errors;
  } finally {
    await server.stop();
  }
}

// --- d ------------------------------------------------------------------------------------------

async function clientSizeBench(): Promise<void> {
  heading('d  the client\'s initial JavaScript (gzip)');
  const dir = await ensureClientBuild((m) => console.log(m));
  if (!dir) {
    console.log('No client sources (client/src/main.ts): nothing to measure.');
    return;
  }
  const html = readFileSync(path.join(clientBrowserDir, 'index.html'), 'utf8');
  const files = new Set<string>();
  for (const m of html.matchAll(/<script\b[^>]*\bsrc="([^"]+)"/g)) files.add(m[1]);
  for (const m of html.matchAll(/<link\b[^>]*\brel="modulepreload"[^>]*\bhref="([^"]+)"/g)) files.add(m[1]);
  for (const m of html.matchAll(/<link\b[^>]*\bhref="([^"]+)"[^>]*\brel="modulepreload"/g)) files.add(m[1]);
  let raw = 0;
  let gzip = 0;
  const rows: { file: string; bytes: number; gzip: number }[] = [];
  for (const file of [...files].sort()) {
    const bytes = readFileSync(path.join(clientBrowserDir, file.replace(/^\//, '')));
    const zipped = gzipSync(bytes, { level: 9 }).length;
    raw += bytes.length;
    gzip += zipped;
    rows.push({ file, bytes: bytes.length, gzip: zipped });
    console.log(`${file.padEnd(40)} ${formatBytes(bytes.length).padStart(11)}  gzip ${formatBytes(zipped).padStart(10)}`);
  }
  const built = statSync(path.join(clientBrowserDir, 'index.html')).mtime.toISOString();
  console.log(`Initial JavaScript: ${files.size} files, ${formatBytes(raw)}, gzip -9 ${formatBytes(gzip)} (build of ${built}).`);
  figures.client = { files: rows, rawBytes: raw, gzipBytes: gzip, built };
}

// --- e ------------------------------------------------------------------------------------------

/** About 1 MiB of CSV: part, run and deviation columns (invented gauge readings). */
function megabyteCsv(): Buffer {
  const lines = ['part,run,deviation'];
  let size = lines[0].length + 1;
  for (let i = 0; size < 1024 * 1024; i++) {
    const line = `HV-${String(i % 400).padStart(4, '0')},${i},${(2 + Math.sin(i * 0.37) * 0.4 + Math.cos(i * 1.7) * 0.1).toFixed(4)}`;
    lines.push(line);
    size += line.length + 1;
  }
  return Buffer.from(`${lines.join('\n')}\n`);
}

async function tableSizes(url: string): Promise<Record<string, number>> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    const { rows } = await client.query<{ name: string; bytes: string }>(
      "select c.relname as name, pg_total_relation_size(c.oid) as bytes from pg_class c join pg_namespace n on n.oid = c.relnamespace where n.nspname = 'public' and c.relkind = 'r' order by 1",
    );
    return Object.fromEntries(rows.map((r) => [r.name, Number(r.bytes)]));
  } finally {
    await client.end();
  }
}

async function storageBench(): Promise<void> {
  heading('e  database bytes: 1,000 revisions of a worksheet that uses one 1 MB dataset');
  const server = await benchServer();
  try {
    const editor = new SessionClient(server.url);
    await editor.signIn(demoEditor.email, demoEditor.password);
    const teamId = (await editor.get('/api/teams')).body.teams[0].id;
    const csv = megabyteCsv();
    const form = new FormData();
    form.append('file', new Blob([csv], { type: 'text/csv' }), 'gauge-readings.csv');
    const upload = SessionClient.expect(await editor.request('POST', `/api/teams/${teamId}/datasets`, undefined, { raw: form }), 201, 'upload');
    const datasetId = upload.body.dataset.id as string;
    const created = SessionClient.expect(await editor.post(`/api/teams/${teamId}/worksheets`, { source: 'blank', title: 'Storage bench' }), 201, 'create');
    const worksheetId = created.body.worksheet.id;
    let head = created.body.head.id as string;
    const before = await tableSizes(server.databaseUrl);
    const started = performance.now();
    let errors = 0;
    for (let i = 0; i < 1000; i++) {
      const res = await editor.post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: head, document: datasetDocument(datasetId, 'deviation', i), message: `revision ${i + 2}` });
      if (res.status !== 201) {
        errors += 1;
        continue;
      }
      head = res.body.revision.id;
      if ((i + 1) % 250 === 0) console.log(`  ${i + 1} saves (${((performance.now() - started) / 1000).toFixed(0)} s)`);
    }
    const after = await tableSizes(server.databaseUrl);
    const total = (sizes: Record<string, number>) => Object.values(sizes).reduce((s, v) => s + v, 0);
    const revisionsCount = Number((await editor.get(`/api/worksheets/${worksheetId}/revisions?pageSize=1`)).body.total);
    const grown = total(after) - total(before);
    console.log(`Dataset: ${formatBytes(csv.length)} of CSV (${upload.body.dataset.rowCount.toLocaleString('en-US')} rows), stored once: datasets table ${formatBytes(after.datasets)}.`);
    console.log(`Revisions stored: ${revisionsCount} (errors ${errors}); revisions table ${formatBytes(after.revisions)}, audit_events ${formatBytes(after.audit_events ?? 0)}, worksheets ${formatBytes(after.worksheets)}.`);
    console.log(`All tables: ${formatBytes(total(after))} = ${(total(after) / csv.length).toFixed(2)} × the dataset; the 1,000 saves added ${formatBytes(grown)} (${formatBytes(grown / 1000)} per revision).`);
    console.log(`Stored per revision instead, the dataset alone would take ${formatBytes(1000 * csv.length)}.`);
    figures.storage = { datasetBytes: csv.length, rows: upload.body.dataset.rowCount, revisions: revisionsCount, errors, before, after, totalBytes: total(after), ratioToDataset: total(after) / csv.length, bytesPerRevision: grown / 1000 };
  } finally {
    await server.stop();
  }
}

// --- main ---------------------------------------------------------------------------------------

const started = Date.now();
console.log(`Spreadproof benchmarks on ${os.cpus().length} CPU(s), load average ${os.loadavg().map((l) => l.toFixed(1)).join(' ')}, Node ${process.version}.`);
if ([...selected].some((s) => 'bce'.includes(s))) console.log(`Databases: ${await useCluster(clusterChoice())}.`);
figures.cluster = clusterChoice();
try {
  if (selected.has('a')) await engineBench();
  if (selected.has('b')) await publishedBench();
  if (selected.has('c')) await saveBench();
  if (selected.has('d')) await clientSizeBench();
  if (selected.has('e')) await storageBench();
} finally {
  mkdirSync(path.join(projectRoot, 'test-output'), { recursive: true });
  writeFileSync(path.join(projectRoot, 'test-output', 'bench.json'), `${JSON.stringify(figures, null, 2)}\n`);
  console.log(`\nBenchmarks finished in ${((Date.now() - started) / 1000).toFixed(0)} s; figures in test-output/bench.json.`);
}
process.exit(0);
