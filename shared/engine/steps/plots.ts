/**
 * Vega-Lite specs for the step results. Every spec carries its data inline (precomputed: bins,
 * densities, points), uses field access only and no expression strings, so the client renders it
 * with vega-embed's expression interpreter and nothing is evaluated from the document.
 */
import { chisqPdf, fPdf, normPdf } from '../distributions/index';
import { quantileSorted } from '../methods/summary';

const SCHEMA = 'https://vega.github.io/schema/vega-lite/v6.json';
const WIDTH = 420;
const HEIGHT = 220;

type Spec = Record<string, unknown>;

function axisTitle(label: string, unit?: string): string {
  return unit ? `${label} (${unit})` : label;
}

/**
 * A density on a sampled curve as drawn: 6 significant digits, far finer than a 220-pixel-high
 * plot can show, and a third of the characters of a full-precision number in the stored results.
 * Only heights: positions keep their full values (readings such as 25.0012 mm with a spread of
 * micrometres would move by a visible fraction of a point step if rounded to 6 digits), and so do
 * bins, statistics and limits.
 */
function drawn(value: number): number {
  return value === 0 || !Number.isFinite(value) ? value : Number(value.toPrecision(6));
}

/** Number of bins: Sturges, at least 5 and at most 40. */
function binCount(n: number): number {
  return Math.max(5, Math.min(40, Math.ceil(Math.log2(n) + 1)));
}

/** Histogram of sorted data with the fitted normal density scaled to counts. */
export function histogramWithNormal(sorted: Float64Array, mean: number, sd: number, label: string, unit?: string): Spec {
  const n = sorted.length;
  const lo = sorted[0];
  const hi = sorted[n - 1];
  const k = binCount(n);
  const width = hi > lo ? (hi - lo) / k : 1;
  const counts = new Array<number>(k).fill(0);
  for (let i = 0; i < n; i++) {
    let b = hi > lo ? Math.floor((sorted[i] - lo) / width) : 0;
    if (b >= k) b = k - 1;
    counts[b]++;
  }
  const bins = counts.map((count, b) => ({ start: lo + b * width, end: lo + (b + 1) * width, count }));
  const curve: { x: number; y: number }[] = [];
  if (sd > 0) {
    const from = Math.min(lo, mean - 3.5 * sd);
    const to = Math.max(hi, mean + 3.5 * sd);
    for (let i = 0; i <= 80; i++) {
      const x = from + ((to - from) * i) / 80;
      curve.push({ x, y: drawn((n * width * normPdf((x - mean) / sd)) / sd) });
    }
  }
  return {
    $schema: SCHEMA,
    title: `Histogram of ${label} with fitted normal`,
    width: WIDTH,
    height: HEIGHT,
    layer: [
      {
        data: { values: bins },
        mark: { type: 'bar', opacity: 0.75 },
        encoding: {
          x: { field: 'start', type: 'quantitative', title: axisTitle(label, unit) },
          x2: { field: 'end' },
          y: { field: 'count', type: 'quantitative', title: 'count' },
          y2: { datum: 0 },
          tooltip: [{ field: 'start', type: 'quantitative' }, { field: 'end', type: 'quantitative' }, { field: 'count', type: 'quantitative' }],
        },
      },
      {
        data: { values: curve },
        mark: { type: 'line', strokeWidth: 2 },
        encoding: { x: { field: 'x', type: 'quantitative' }, y: { field: 'y', type: 'quantitative' } },
      },
    ],
  };
}

/**
 * Density of the test statistic with the rejection region shaded and the observed value marked.
 * `density` is the pdf; `range` the x extent; `regions` the rejection intervals.
 */
export function densityWithRejection(options: {
  title: string;
  statisticLabel: string;
  density: (x: number) => number;
  range: [number, number];
  rejection: [number, number][];
  statistic: number;
}): Spec {
  const [from, to] = options.range;
  const points: { x: number; density: number; region: string }[] = [];
  const steps = 120; // 3.5 px apart on a 420 px plot
  const inside = (x: number) => options.rejection.some(([a, b]) => x >= a && x <= b);
  // Sample the curve, adding the region edges so the shading starts exactly at the critical values.
  const xs: number[] = [];
  for (let i = 0; i <= steps; i++) xs.push(from + ((to - from) * i) / steps);
  for (const [a, b] of options.rejection) {
    if (a > from && a < to) xs.push(a);
    if (b > from && b < to) xs.push(b);
  }
  xs.sort((p, q) => p - q);
  for (const x of xs) {
    const d = options.density(x);
    if (!Number.isFinite(d)) continue;
    points.push({ x, density: d, region: inside(x) ? 'reject H0' : 'do not reject' });
  }
  const regionPoints: { x: number; density: number; region: string }[] = [];
  options.rejection.forEach(([a, b], r) => {
    for (const p of points) if (p.x >= a && p.x <= b) regionPoints.push({ ...p, region: `rejection region ${r + 1}` });
  });
  for (const list of [points, regionPoints]) {
    for (const p of list) {
      p.density = drawn(p.density);
    }
  }
  const marked = Math.min(Math.max(options.statistic, from), to);
  return {
    $schema: SCHEMA,
    title: options.title,
    width: WIDTH,
    height: HEIGHT,
    layer: [
      {
        data: { values: points },
        mark: { type: 'line' },
        encoding: {
          x: { field: 'x', type: 'quantitative', title: options.statisticLabel },
          y: { field: 'density', type: 'quantitative', title: 'density' },
        },
      },
      {
        data: { values: regionPoints },
        mark: { type: 'area', opacity: 0.4, color: '#c0392b' },
        encoding: {
          x: { field: 'x', type: 'quantitative' },
          y: { field: 'density', type: 'quantitative' },
          detail: { field: 'region', type: 'nominal' },
        },
      },
      {
        data: { values: [{ statistic: marked, label: `observed ${options.statisticLabel}` }] },
        mark: { type: 'rule', strokeWidth: 2, strokeDash: [4, 3] },
        encoding: { x: { field: 'statistic', type: 'quantitative' }, tooltip: [{ field: 'label', type: 'nominal' }, { field: 'statistic', type: 'quantitative' }] },
      },
    ],
  };
}

export function chiSquareDensityPlot(df: number, statistic: number, criticalLower: number | null, criticalUpper: number | null, title: string): Spec {
  const hiQ = Math.max(criticalUpper ?? 0, df + 5 * Math.sqrt(2 * df), statistic);
  const loQ = Math.max(0, Math.min(criticalLower ?? df, df - 5 * Math.sqrt(2 * df), statistic));
  const rejection: [number, number][] = [];
  if (criticalLower !== null) rejection.push([loQ, criticalLower]);
  if (criticalUpper !== null) rejection.push([criticalUpper, hiQ * 1.05]);
  return densityWithRejection({
    title,
    statisticLabel: 'chi-square',
    density: (x) => (x <= 0 && df <= 2 ? NaN : chisqPdf(x, df)),
    range: [loQ, hiQ * 1.05],
    rejection,
    statistic,
  });
}

export function fDensityPlot(df1: number, df2: number, statistic: number, criticalLower: number | null, criticalUpper: number | null, title: string): Spec {
  const top = Math.max(criticalUpper ?? 0, statistic, 3) * 1.15;
  const rejection: [number, number][] = [];
  if (criticalLower !== null) rejection.push([0, criticalLower]);
  if (criticalUpper !== null) rejection.push([criticalUpper, top]);
  return densityWithRejection({
    title,
    statisticLabel: 'F',
    density: (x) => (x <= 0 ? NaN : fPdf(x, df1, df2)),
    range: [top / 400, top],
    rejection,
    statistic,
  });
}

export interface IntervalRow {
  level: string;
  method: string;
  lower: number;
  upper: number;
  estimate: number;
}

/** Intervals for sigma across confidence levels and methods (one-sided bounds drawn to the estimate). */
export function intervalChart(rows: IntervalRow[], label: string, unit?: string): Spec {
  return {
    $schema: SCHEMA,
    title: `Confidence intervals for ${label}`,
    width: WIDTH,
    height: { step: 22 },
    data: { values: rows },
    encoding: {
      y: { field: 'level', type: 'nominal', title: 'confidence level', sort: null },
      yOffset: { field: 'method', type: 'nominal' },
      color: { field: 'method', type: 'nominal', title: 'method' },
    },
    layer: [
      {
        mark: { type: 'rule', strokeWidth: 3 },
        encoding: {
          x: { field: 'lower', type: 'quantitative', title: axisTitle(label, unit), scale: { zero: false } },
          x2: { field: 'upper' },
          tooltip: [
            { field: 'method', type: 'nominal' },
            { field: 'level', type: 'nominal' },
            { field: 'lower', type: 'quantitative' },
            { field: 'upper', type: 'quantitative' },
          ],
        },
      },
      { mark: { type: 'point', filled: true, color: 'black' }, encoding: { x: { field: 'estimate', type: 'quantitative' } } },
    ],
  };
}

/** Normal probability plot with the line mean + sd·z. */
export function probabilityPlot(points: { theoretical: number; observed: number }[], mean: number, sd: number, label: string, unit?: string): Spec {
  const zs = points.length ? [points[0].theoretical, points[points.length - 1].theoretical] : [-2, 2];
  return {
    $schema: SCHEMA,
    title: `Normal probability plot of ${label}`,
    width: WIDTH,
    height: HEIGHT,
    layer: [
      {
        data: { values: points },
        mark: { type: 'point', filled: true, size: 24 },
        encoding: {
          x: { field: 'theoretical', type: 'quantitative', title: 'normal quantile' },
          y: { field: 'observed', type: 'quantitative', title: axisTitle(label, unit), scale: { zero: false } },
        },
      },
      {
        data: { values: zs.map((z) => ({ theoretical: z, observed: mean + sd * z })) },
        mark: { type: 'line', strokeDash: [5, 4] },
        encoding: { x: { field: 'theoretical', type: 'quantitative' }, y: { field: 'observed', type: 'quantitative' } },
      },
    ],
  };
}

/** Box plot by group from precomputed five-number summaries (whiskers to the most extreme values within 1.5 IQR). */
export function boxPlot(groups: { label: string; sorted: Float64Array }[], label: string, unit?: string): Spec {
  const boxes = groups.map(({ label: group, sorted }) => {
    const q1 = quantileSorted(sorted, 0.25);
    const q3 = quantileSorted(sorted, 0.75);
    const iqr = q3 - q1;
    let lo = sorted[0];
    let hi = sorted[sorted.length - 1];
    for (let i = 0; i < sorted.length; i++) if (sorted[i] >= q1 - 1.5 * iqr) { lo = sorted[i]; break; }
    for (let i = sorted.length - 1; i >= 0; i--) if (sorted[i] <= q3 + 1.5 * iqr) { hi = sorted[i]; break; }
    return { group, q1, median: quantileSorted(sorted, 0.5), q3, lower: lo, upper: hi };
  });
  const outliers: { group: string; value: number }[] = [];
  groups.forEach(({ label: group, sorted }, g) => {
    for (let i = 0; i < sorted.length && outliers.length < 2000; i++) {
      if (sorted[i] < boxes[g].lower || sorted[i] > boxes[g].upper) outliers.push({ group, value: sorted[i] });
    }
  });
  const x = { field: 'group', type: 'nominal', title: 'group', sort: null };
  return {
    $schema: SCHEMA,
    title: `${label} by group`,
    width: WIDTH,
    height: HEIGHT,
    layer: [
      {
        data: { values: boxes },
        mark: { type: 'rule' },
        encoding: { x, y: { field: 'lower', type: 'quantitative', title: axisTitle(label, unit), scale: { zero: false } }, y2: { field: 'upper' } },
      },
      {
        data: { values: boxes },
        mark: { type: 'bar', size: 18, opacity: 0.8 },
        encoding: { x, y: { field: 'q1', type: 'quantitative' }, y2: { field: 'q3' } },
      },
      {
        data: { values: boxes },
        mark: { type: 'tick', size: 18, color: 'white', thickness: 2 },
        encoding: { x, y: { field: 'median', type: 'quantitative' } },
      },
      {
        data: { values: outliers },
        mark: { type: 'point' },
        encoding: { x, y: { field: 'value', type: 'quantitative' } },
      },
    ],
  };
}

/** Power against the true ratio, with the required power as a rule when given. */
export function powerCurvePlot(points: { ratio: number; power: number }[], ratioLabel: string, title: string, requiredPower?: number, yTitle = 'power'): Spec {
  const layer: Spec[] = [
    {
      data: { values: points },
      mark: { type: 'line', point: false },
      encoding: {
        x: { field: 'ratio', type: 'quantitative', title: ratioLabel },
        y: { field: 'power', type: 'quantitative', title: yTitle, scale: { domain: [0, 1] } },
      },
    },
  ];
  if (requiredPower !== undefined) {
    layer.push({ data: { values: [{ power: requiredPower }] }, mark: { type: 'rule', strokeDash: [4, 3] }, encoding: { y: { field: 'power', type: 'quantitative' } } });
  }
  return { $schema: SCHEMA, title, width: WIDTH, height: HEIGHT, layer };
}

/** Normal density over the specification limits, the fraction outside shaded. */
export function capabilityPlot(mean: number, sd: number, lsl: number | undefined, usl: number | undefined, label: string, unit?: string): Spec {
  const from = Math.min(mean - 4 * sd, lsl ?? Infinity);
  const to = Math.max(mean + 4 * sd, usl ?? -Infinity);
  const points: { x: number; density: number }[] = [];
  for (let i = 0; i <= 120; i++) {
    const x = from + ((to - from) * i) / 120;
    points.push({ x, density: drawn(normPdf((x - mean) / sd) / sd) });
  }
  const limits = [
    ...(lsl !== undefined ? [{ limit: lsl, name: 'LSL' }] : []),
    ...(usl !== undefined ? [{ limit: usl, name: 'USL' }] : []),
  ];
  return {
    $schema: SCHEMA,
    title: `Fitted normal of ${label} against the specification limits`,
    width: WIDTH,
    height: HEIGHT,
    layer: [
      {
        data: { values: points },
        mark: { type: 'area', opacity: 0.35 },
        encoding: {
          x: { field: 'x', type: 'quantitative', title: axisTitle(label, unit), scale: { zero: false } },
          y: { field: 'density', type: 'quantitative', title: 'density' },
        },
      },
      {
        data: { values: limits },
        mark: { type: 'rule', strokeWidth: 2, color: '#c0392b' },
        encoding: { x: { field: 'limit', type: 'quantitative' }, tooltip: [{ field: 'name', type: 'nominal' }, { field: 'limit', type: 'quantitative' }] },
      },
    ],
  };
}

