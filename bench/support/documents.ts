/**
 * Worksheet documents for the benchmarks, the load script and the reliability suites: the
 * committed examples, and a 20-step worksheet over invented gauge readings (Harrow Vale Precision
 * demo scenario) whose values vary with a seed, so that each save is a new document the engine
 * really evaluates rather than a cache hit.
 */
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import type { WorksheetInput } from '@shared/format/worksheet';
import { projectRoot } from '../../server/paths';

/** The example worksheets in examples/*.json, by file name. */
export function exampleDocuments(): Record<string, WorksheetInput> {
  const dir = path.join(projectRoot, 'examples');
  const out: Record<string, WorksheetInput> = {};
  for (const file of readdirSync(dir).filter((f) => f.endsWith('.json')).sort()) {
    out[file] = JSON.parse(readFileSync(path.join(dir, file), 'utf8')) as WorksheetInput;
  }
  return out;
}

/** Mulberry32: a small seeded PRNG, so every run builds the same documents. */
export function prng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Approximately normal values (sum of uniforms), rounded to 0.001. */
function readings(random: () => number, n: number, mean: number, sd: number): number[] {
  return Array.from({ length: n }, () => {
    let s = 0;
    for (let i = 0; i < 12; i++) s += random();
    return Math.round((mean + (s - 6) * sd) * 1000) / 1000;
  });
}

/**
 * A worksheet of exactly 20 steps: a data step (60 readings on three gauges), a derived column,
 * summaries, intervals at several levels, tests, a group comparison, a ratio, normality checks,
 * capability, plans and notes. `seed` changes the readings (and so both hashes).
 */
export function twentyStepDocument(seed: number, title = `Gauge study ${seed}`): WorksheetInput {
  const random = prng(seed + 1);
  const values = readings(random, 60, 2.0, 0.35);
  const gauges = values.map((_, i) => ['Gauge A', 'Gauge B', 'Gauge C'][i % 3]);
  const src = { step: 'readings', column: 'reading' };
  const byGauge = { ...src, groupBy: 'gauge' };
  const document: WorksheetInput = {
    format: 'spreadproof.worksheet',
    version: 1,
    title,
    steps: [
      {
        id: 'readings',
        kind: 'data',
        title: 'Bore readings on three gauges',
        params: {
          origin: 'inline',
          columns: [
            { name: 'reading', type: 'number', unit: 'um', values },
            { name: 'gauge', type: 'text', values: gauges },
          ],
        },
      },
      { id: 'in-mm', kind: 'derived-column', params: { step: 'readings', name: 'reading_mm', expression: 'reading / 1000', unit: 'mm' } },
      { id: 'about', kind: 'note', params: { markdown: `Readings of run ${seed}, deviation from the ring's size. Bound: $\\sigma \\le 0.5$ um.` } },
      { id: 'spread', kind: 'spread-summary', params: { source: src } },
      { id: 'spread-by-gauge', kind: 'spread-summary', params: { source: byGauge } },
      { id: 'shape', kind: 'normality-check', params: { source: src, alpha: 0.05 } },
      { id: 'shape-a', kind: 'normality-check', params: { source: { ...byGauge, groups: ['Gauge A'] } } },
      { id: 'bound', kind: 'sigma-interval', params: { source: src, levels: [0.9, 0.95, 0.99], sides: 'upper' } },
      { id: 'two-sided', kind: 'sigma-interval', params: { source: src, levels: [0.95], sides: 'two-sided' } },
      { id: 'bound-a', kind: 'sigma-interval', params: { source: { ...byGauge, groups: ['Gauge A'] }, levels: [0.95] } },
      { id: 'requirement', kind: 'target-test', params: { source: src, sigma0: 0.5, alternative: 'less', alpha: 0.05 } },
      { id: 'requirement-2', kind: 'target-test', params: { source: src, sigma0: 0.3, alternative: 'two-sided', alpha: 0.05 } },
      { id: 'gauges', kind: 'group-comparison', params: { source: byGauge, alpha: 0.05 } },
      { id: 'a-vs-b', kind: 'two-sample-ratio', params: { source: { ...byGauge, groups: ['Gauge A', 'Gauge B'] }, alternative: 'two-sided' } },
      { id: 'capability', kind: 'capability', params: { source: src, lsl: 0.5, usl: 3.5, level: 0.95, tolerance: { coverage: 0.99, confidence: 0.95 } } },
      { id: 'how-many', kind: 'sample-size-plan', params: { plan: { goal: 'relative-precision', level: 0.95, percent: 20 } } },
      { id: 'ratio-plan', kind: 'sample-size-plan', params: { plan: { goal: 'interval-ratio', level: 0.95, ratio: 2 } } },
      { id: 'power', kind: 'sample-size-plan', params: { plan: { goal: 'chi-square-power', ratio: 1.5, power: 0.9 } } },
      { id: 'f-power', kind: 'sample-size-plan', params: { plan: { goal: 'f-power', ratio: 1.5, power: 0.9 } } },
      { id: 'reading', kind: 'note', title: 'Reading', params: { markdown: 'The **upper** bound decides; see the normality check first.' } },
    ],
  };
  if (document.steps.length !== 20) throw new Error(`twentyStepDocument has ${document.steps.length} steps`);
  return document;
}

/** A worksheet whose one data step uses an uploaded dataset (by its SHA-256 id), plus analysis steps. */
export function datasetDocument(datasetId: string, column: string, seed: number): WorksheetInput {
  const src = { step: 'data', column };
  return {
    format: 'spreadproof.worksheet',
    version: 1,
    title: `Dataset study ${seed}`,
    steps: [
      { id: 'data', kind: 'data', params: { origin: 'dataset', datasetId } },
      { id: 'spread', kind: 'spread-summary', params: { source: src } },
      { id: 'bound', kind: 'sigma-interval', params: { source: src, levels: [0.9 + (seed % 9) / 100], sides: 'upper' } },
    ],
  };
}
