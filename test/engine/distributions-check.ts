// Shared helper of the distribution tests: compares a function with reference values under the
// tolerance |y − e| ≤ N·Number.EPSILON·|e| and reports every failure with its inputs.
import { readFileSync, existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';

const here = dirname(fileURLToPath(import.meta.url));
export const fixturePath = (rel: string): string => join(here, '..', 'fixtures', rel);

export function loadFixture<T = any>(rel: string): T {
  return JSON.parse(readFileSync(fixturePath(rel), 'utf8')) as T;
}
export const fixtureExists = (rel: string): boolean => existsSync(fixturePath(rel));

export interface CheckResult {
  count: number;
  maxUlps: number;
  failures: string[];
}

/**
 * Runs `fn` over parallel arrays; `inputs` maps argument names to arrays. Expected values that are
 * not numbers (R's NaN written as a string) are skipped. Returns the largest error seen in units of
 * eps·|e| and the failure lines.
 */
export function checkAgainst(
  label: string,
  inputs: Record<string, number[]>,
  expected: (number | string | null)[],
  fn: (...args: number[]) => number,
  N: number,
  include: (i: number) => boolean = () => true,
): CheckResult {
  const names = Object.keys(inputs);
  let maxUlps = 0;
  let count = 0;
  const failures: string[] = [];
  for (let i = 0; i < expected.length; i++) {
    const e = expected[i];
    if (typeof e !== 'number' || !include(i)) continue;
    const args = names.map((n) => inputs[n][i]);
    const y = fn(...args);
    const diff = Math.abs(y - e);
    const tol = N * Number.EPSILON * Math.abs(e);
    const ulps = e === 0 ? (y === 0 ? 0 : Infinity) : diff / (Number.EPSILON * Math.abs(e));
    count++;
    if (!(ulps <= maxUlps)) maxUlps = ulps;
    if (!(diff <= tol) && !(y === e)) {
      failures.push(
        `${label}(${names.map((n, k) => `${n}=${args[k]}`).join(', ')}) = ${y}, expected ${e}, ` +
          `difference ${diff.toExponential(3)}, tolerance ${tol.toExponential(3)} (${N} eps)`,
      );
    }
  }
  return { count, maxUlps, failures };
}

export function report(r: CheckResult, label: string, N: number): string {
  const head = `${label}: ${r.count} points, max error ${r.maxUlps.toFixed(1)} eps (tolerance ${N} eps)`;
  if (r.failures.length === 0) return head;
  return `${head}\n${r.failures.length} failures, first ones:\n${r.failures.slice(0, 12).join('\n')}`;
}
