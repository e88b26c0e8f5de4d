/** Small statistics for the benchmark and load figures. */
export function percentile(values: number[], p: number): number {
  if (values.length === 0) return NaN;
  const sorted = [...values].sort((a, b) => a - b);
  // Nearest rank: the smallest value with at least p % of the values at or below it.
  const rank = Math.max(1, Math.ceil((p / 100) * sorted.length));
  return sorted[rank - 1];
}

export const median = (values: number[]) => percentile(values, 50);

export function summary(values: number[]): { n: number; p50: number; p95: number; p99: number; max: number; mean: number } {
  const mean = values.reduce((s, v) => s + v, 0) / Math.max(1, values.length);
  return { n: values.length, p50: percentile(values, 50), p95: percentile(values, 95), p99: percentile(values, 99), max: percentile(values, 100), mean };
}

export const ms = (value: number) => (Number.isFinite(value) ? `${value.toFixed(value < 10 ? 1 : 0)} ms` : '–');

export function formatBytes(bytes: number): string {
  if (bytes >= 1024 * 1024) return `${(bytes / (1024 * 1024)).toFixed(2)} MiB`;
  if (bytes >= 1024) return `${(bytes / 1024).toFixed(1)} KiB`;
  return `${bytes} B`;
}

/** Peak resident memory of a process (VmHWM), in bytes; null where /proc is not readable. */
export async function peakRss(pid: number): Promise<number | null> {
  try {
    const { readFile } = await import('node:fs/promises');
    const status = await readFile(`/proc/${pid}/status`, 'utf8');
    const match = /VmHWM:\s+(\d+) kB/.exec(status);
    return match ? Number(match[1]) * 1024 : null;
  } catch {
    return null;
  }
}
