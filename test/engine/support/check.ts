// Shared assertions for the engine's method tests.
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { expect } from 'chai';

export const repoRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../..');
export const EPS = Number.EPSILON;

/** |actual − expected| ≤ N·ε·|expected| (or ≤ N·ε when expected is 0); prints everything on failure. */
export function expectEps(actual: number, expected: number, n: number, label: string): void {
  const diff = Math.abs(actual - expected);
  const tol = n * EPS * (expected === 0 ? 1 : Math.abs(expected));
  expect(diff <= tol, `${label}: got ${actual}, expected ${expected}, |diff| ${diff.toExponential(3)} > tolerance ${tol.toExponential(3)} (${n} eps rel)`).to.equal(true);
}

/** Relative tolerance given directly (for published values printed to a few digits). */
export function expectRel(actual: number, expected: number, rel: number, label: string): void {
  const diff = Math.abs(actual - expected);
  const tol = rel * Math.abs(expected);
  expect(diff <= tol, `${label}: got ${actual}, expected ${expected}, |diff| ${diff.toExponential(3)} > ${tol.toExponential(3)} (rel ${rel})`).to.equal(true);
}

/**
 * `actual` agrees with a value printed as the decimal string `printed`: within half a unit of its
 * last printed digit (plus a hair for the printed value's own rounding of an already-rounded value).
 */
export function expectPrinted(actual: number, printed: string, label: string): void {
  const decimals = printed.includes('.') ? printed.split('.')[1].replace(/e.*$/i, '').length : 0;
  const exp = /e(-?\d+)/i.exec(printed);
  const unit = Math.pow(10, -decimals + (exp ? Number(exp[1]) : 0));
  const expected = Number(printed);
  const diff = Math.abs(actual - expected);
  expect(diff <= 0.5 * unit * (1 + 1e-9), `${label}: got ${actual}, printed ${printed}, |diff| ${diff.toExponential(3)} > half a unit ${(0.5 * unit).toExponential(3)}`).to.equal(true);
}

export interface GearData {
  diameter: number[];
  batch: string[];
}

/** The NIST gear-diameter data from ../shared/reference-data/, or null (the caller skips) when absent. */
export function readGearData(): GearData | null {
  const file = path.resolve(repoRoot, '../shared/reference-data/nist-gear-diameter.csv');
  if (!existsSync(file)) return null;
  const lines = readFileSync(file, 'utf8').trim().split(/\r?\n/).slice(1);
  const diameter: number[] = [];
  const batch: string[] = [];
  for (const line of lines) {
    const [d, b] = line.split(',');
    diameter.push(Number(d));
    batch.push(b.trim());
  }
  return { diameter, batch };
}

export const GEAR_ABSENT = 'NIST gear data not found at ../shared/reference-data/nist-gear-diameter.csv; skipping the gear-data checks';

export function groupBy(values: number[], labels: string[]): Map<string, number[]> {
  const map = new Map<string, number[]>();
  values.forEach((v, i) => {
    const list = map.get(labels[i]) ?? [];
    list.push(v);
    map.set(labels[i], list);
  });
  return map;
}
