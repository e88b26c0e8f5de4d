// Engine benchmark: `npm run bench:engine`.
//
// 1. The variance methods on n = 1e4 … 1e7 normal values (seeded): spread summary (validation,
//    moments, median and quartiles), sigma interval (chi-square at 95 % and Bonett), target test
//    and Anderson-Darling, against a floor measured in the same run on the same data: two plain
//    Float64Array passes (sum, sum of squared deviations) and one built-in Float64Array sort of a
//    copy. Target: ratio ≤ 0.9 at n = 1e6. Also the memory: peak RSS, and how many copies of the
//    data the methods hold at once at n = 1e7 (target: about three at most).
// 2. Parsing a 1e6-row, three-column CSV into typed columns with parseTable, against papaparse
//    (header: true, dynamicTyping: true) on the same text in the same run. Target: ratio ≤ 0.45.
//
// Each figure is the median of several repetitions; floor and methods (or the two parsers)
// alternate, so that both see the same machine load, and each ratio is taken repetition by
// repetition before the median. Speed targets live here, printed, not in timed tests.
import Papa from 'papaparse';
import { chiSquareVarianceTest } from '../shared/engine/methods/target-test';
import { andersonDarling } from '../shared/engine/methods/normality';
import { createRng } from '../shared/engine/methods/random';
import { Sample, spreadSummary } from '../shared/engine/methods/summary';
import { bonettBasis, bonettInterval, chiSquareInterval } from '../shared/engine/methods/variance-interval';
import { sortFloat64 } from '../shared/engine/sort';
import { parseTable } from '../shared/engine/table/parse';

const gc = (globalThis as { gc?: () => void }).gc;
const mb = (bytes: number) => bytes / (1024 * 1024);
const peakRssMb = () => process.resourceUsage().maxRSS / 1024; // maxRSS is in kilobytes
const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};
const fmt = (x: number, digits = 1) => x.toFixed(digits);
const pad = (text: string, width: number) => text.padStart(width);

/** Standard normal values (seeded), or gauge readings: 12.5 mm with sigma 4 um. */
function normalData(n: number, seed: string, kind: 'standard' | 'gauge' = 'standard'): Float64Array {
  const rng = createRng(seed);
  const values = new Float64Array(n);
  if (kind === 'standard') for (let i = 0; i < n; i++) values[i] = rng.normal();
  else for (let i = 0; i < n; i++) values[i] = 12.5 + 0.004 * rng.normal();
  return values;
}

/** CPU time of this process in ms (user + system): less disturbed than wall time by other processes. */
const cpuMs = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
};

interface Timing {
  wall: number;
  cpu: number;
}

function timeIt(run: () => unknown): Timing {
  const c = cpuMs();
  const w = performance.now();
  run();
  return { wall: performance.now() - w, cpu: cpuMs() - c };
}

let sink = 0;

/** The floor: two Float64Array passes and one built-in sort of a copy. */
function floor(values: Float64Array): void {
  let sum = 0;
  for (let i = 0; i < values.length; i++) sum += values[i];
  const mean = sum / values.length;
  let ss = 0;
  for (let i = 0; i < values.length; i++) {
    const d = values[i] - mean;
    ss += d * d;
  }
  const sorted = values.slice().sort();
  sink += ss + sorted[sorted.length >> 1];
}

interface MethodTimes {
  summary: Timing;
  interval: Timing;
  target: Timing;
  anderson: Timing;
  total: Timing;
}

/** The methods, timed part by part (wall and CPU). */
function methods(values: Float64Array): MethodTimes {
  let sample!: Sample;
  const summary = timeIt(() => {
    sample = Sample.of(values, 2);
    sink += spreadSummary(sample).median; // sorts once (radix); the sorted copy is shared below
  });
  const interval = timeIt(() => {
    sink += chiSquareInterval(sample.n, sample.moments.variance, 0.95).sdLower;
    sink += bonettInterval(bonettBasis(sample), 0.95).sdLower;
  });
  const target = timeIt(() => {
    sink += chiSquareVarianceTest(sample.n, sample.moments.variance, 1.05, 'two-sided', 0.05).statistic;
  });
  const anderson = timeIt(() => {
    sink += andersonDarling(sample.sorted(), sample.moments.mean, sample.moments.sd).statistic;
  });
  const parts = [summary, interval, target, anderson];
  const total = { wall: parts.reduce((a, p) => a + p.wall, 0), cpu: parts.reduce((a, p) => a + p.cpu, 0) };
  return { summary, interval, target, anderson, total };
}

const HEADER = [
  pad('data', 9),
  pad('n', 6),
  pad('floor', 8),
  pad('methods', 8),
  pad('ratio', 6),
  pad('cpu ratio', 9),
  pad('summary', 8),
  pad('interval', 8),
  pad('target', 7),
  pad('A-D', 7),
  pad('radix', 7),
  pad('built-in', 8),
  pad('peak RSS', 9),
].join(' ');

function measure(kind: 'standard' | 'gauge', n: number): void {
  const repetitions = n <= 1e5 ? 15 : n <= 1e6 ? 11 : 3;
  gc?.();
  const values = normalData(n, `bench-${kind}-${n}`, kind);
  const floors: Timing[] = [];
  const runs: MethodTimes[] = [];
  const radix: number[] = [];
  const builtin: number[] = [];
  for (let r = 0; r < repetitions; r++) {
    floors.push(timeIt(() => floor(values)));
    runs.push(methods(values));
    radix.push(timeIt(() => sortFloat64(values)).wall);
    builtin.push(timeIt(() => values.slice().sort()).wall);
  }
  const wallRatio = median(runs.map((m, r) => m.total.wall / floors[r].wall));
  const cpuRatio = median(runs.map((m, r) => m.total.cpu / floors[r].cpu));
  const part = (pick: (m: MethodTimes) => Timing, digits = 1) => fmt(median(runs.map((m) => pick(m).wall)), digits);
  console.log(
    [
      pad(kind, 9),
      pad(n.toExponential(0).replace('+', ''), 6),
      pad(fmt(median(floors.map((f) => f.wall))), 8),
      pad(fmt(median(runs.map((m) => m.total.wall))), 8),
      pad(fmt(wallRatio, 3), 6),
      pad(fmt(cpuRatio, 3), 9),
      pad(part((m) => m.summary), 8),
      pad(part((m) => m.interval), 8),
      pad(part((m) => m.target, 2), 7),
      pad(part((m) => m.anderson), 7),
      pad(fmt(median(radix)), 7),
      pad(fmt(median(builtin)), 8),
      pad(`${fmt(peakRssMb(), 0)} MB`, 9),
    ].join(' '),
  );
}

function benchMethods(): void {
  console.log('Variance methods against the floor, wall-clock ms (median of repetitions)');
  console.log('  methods = spread summary (validation, moments, median, quartiles) + sigma interval (chi-square and');
  console.log('  Bonett, 95 %) + target test + Anderson-Darling; floor = two Float64Array passes + built-in sort of a copy;');
  console.log('  ratio = methods / floor per repetition (wall clock; "cpu ratio" from the process CPU time, which');
  console.log('  other processes on the machine disturb less); radix = sortFloat64, built-in = Float64Array sort.');
  console.log(HEADER);
  // Warm-up, so that the first size is not timed while the code is still being compiled.
  const warm = normalData(200_000, 'warm-up');
  for (let i = 0; i < 5; i++) {
    floor(warm);
    methods(warm);
    sortFloat64(warm);
  }
  for (const n of [1e4, 1e5, 1e6]) measure('standard', n);

  // Memory at 1e7: the methods alone, before any floor run allocates its copy.
  gc?.();
  const big = normalData(1e7, 'bench-memory');
  gc?.();
  const before = peakRssMb();
  methods(big);
  const copies = 1 + (peakRssMb() - before) / mb(big.byteLength);
  measure('standard', 1e7);
  measure('gauge', 1e6);
  console.log(
    `Memory at n = 1e7: the methods hold about ${fmt(copies, 2)} copies of the data at their peak (the data, the sorted ` +
      `copy and the sort's scratch; target: about three at most)${gc ? '' : '; run with node --expose-gc for a cleaner figure'}.`,
  );
  console.log('Target: ratio ≤ 0.9 at n = 1e6.\n');
}

function csvText(rows: number): string {
  const rng = createRng('bench-csv');
  const lines = ['diameter_mm,runout_um,batch'];
  for (let i = 0; i < rows; i++) {
    const diameter = 12.5 + 0.004 * rng.normal();
    const runout = Math.abs(3 + 1.2 * rng.normal());
    lines.push(`${diameter.toFixed(5)},${runout.toFixed(3)},${1 + Math.floor(rng.uniform() * 20)}`);
  }
  return lines.join('\n'); // no trailing newline: papaparse would add an empty row
}

function benchParse(): void {
  const rows = 1_000_000;
  const text = csvText(rows);
  const bytes = new TextEncoder().encode(text);
  console.log(`Parsing a ${rows.toLocaleString('en-US')}-row, three-column CSV (${fmt(mb(bytes.length))} MB), median of repetitions; ms`);
  // Same result from both readers (sums of the numeric columns), so the race is fair.
  const own = parseTable(text);
  const papa = Papa.parse<Record<string, number>>(text, { header: true, dynamicTyping: true });
  if (own.rowCount !== rows || papa.data.length !== rows) throw new Error(`row counts differ: ${own.rowCount} vs ${papa.data.length}`);
  for (const column of own.columns) {
    if (column.type !== 'number') throw new Error(`column ${column.name} was not read as numbers`);
    const mine = column.values.reduce((a, b) => a + b, 0);
    const theirs = papa.data.reduce((a, row) => a + row[column.name], 0);
    if (mine !== theirs) throw new Error(`column ${column.name}: sums differ (${mine} vs ${theirs})`);
  }

  const papaTimes: Timing[] = [];
  const textTimes: Timing[] = [];
  const byteTimes: Timing[] = [];
  for (let r = 0; r < 5; r++) {
    gc?.();
    papaTimes.push(timeIt(() => Papa.parse(text, { header: true, dynamicTyping: true })));
    gc?.();
    textTimes.push(timeIt(() => parseTable(text)));
    gc?.();
    byteTimes.push(timeIt(() => parseTable(bytes)));
  }
  const row = (label: string, times: Timing[]) =>
    console.log(
      [
        pad(label, 34),
        pad(fmt(median(times.map((t) => t.wall))), 9),
        pad(fmt(median(times.map((t, r) => t.wall / papaTimes[r].wall)), 3), 7),
        pad(fmt(median(times.map((t, r) => t.cpu / papaTimes[r].cpu)), 3), 9),
      ].join(' '),
    );
  console.log([pad('reader', 34), pad('ms', 9), pad('ratio', 7), pad('cpu ratio', 9)].join(' '));
  row('papaparse (header, dynamicTyping)', papaTimes);
  row('parseTable (text)', textTimes);
  row('parseTable (bytes, with decoding)', byteTimes);
  console.log('Target: ratio ≤ 0.45.');
  console.log(`Peak RSS of the whole run: ${fmt(peakRssMb(), 0)} MB`);
}

console.log(`Spreadproof engine benchmark — node ${process.version}, ${new Date().toISOString().slice(0, 10)}\n`);
benchMethods();
benchParse();
if (sink === 42) console.log(''); // keeps the results alive
