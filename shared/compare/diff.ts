// Generic building blocks of a revision comparison: leaf-by-leaf differences of JSON values,
// a longest-common-subsequence to tell moved steps from steps that kept their place, and
// multiset differences of table rows. Pure and deterministic; used on the server and in the client.

export interface LeafChange {
  /** Dotted path below the compared object, array indexes as numbers: `params.levels.1`. */
  path: string;
  from: unknown;
  to: unknown;
}

/** Arrays of more primitives than this are reported as one change with their lengths, not item by item. */
export const LONG_ARRAY = 24;

function isPlainObject(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value) && !ArrayBuffer.isView(value);
}

function isPrimitiveArray(value: unknown): value is unknown[] {
  return Array.isArray(value) && value.every((v) => v === null || typeof v !== 'object');
}

function sameLeaf(a: unknown, b: unknown): boolean {
  // 0 and -0 are the same value in a worksheet; NaN never occurs in canonical JSON.
  return a === b;
}

/** Deep equality of JSON values (object key order ignored). */
export function jsonEqual(a: unknown, b: unknown): boolean {
  if (a === b) return true;
  if (Array.isArray(a) && Array.isArray(b)) {
    return a.length === b.length && a.every((v, i) => jsonEqual(v, b[i]));
  }
  if (isPlainObject(a) && isPlainObject(b)) {
    const ka = Object.keys(a).filter((k) => a[k] !== undefined);
    const kb = Object.keys(b).filter((k) => b[k] !== undefined);
    return ka.length === kb.length && ka.every((k) => jsonEqual(a[k], b[k]));
  }
  return false;
}

/**
 * Every leaf that differs between `a` and `b`, in a stable order (keys sorted). A leaf present on
 * one side only is reported with `null` on the other (the client shows it as "not set"), so the
 * answer survives JSON unchanged.
 * Long arrays of primitives are summarised as `{ items: n }` to keep the answer small.
 */
export function leafChanges(a: unknown, b: unknown, skip: (path: string) => boolean = () => false): LeafChange[] {
  const out: LeafChange[] = [];
  walk(a, b, '', out, skip);
  return out;
}

function join(path: string, key: string | number): string {
  return path === '' ? String(key) : `${path}.${key}`;
}

function walk(a: unknown, b: unknown, path: string, out: LeafChange[], skip: (path: string) => boolean): void {
  if (path !== '' && skip(path)) return;
  if (isPlainObject(a) && isPlainObject(b)) {
    const keys = [...new Set([...Object.keys(a), ...Object.keys(b)])].sort();
    for (const key of keys) walk(a[key], b[key], join(path, key), out, skip);
    return;
  }
  if (Array.isArray(a) && Array.isArray(b)) {
    if ((a.length > LONG_ARRAY || b.length > LONG_ARRAY) && isPrimitiveArray(a) && isPrimitiveArray(b)) {
      if (!jsonEqual(a, b)) out.push({ path, from: { items: a.length }, to: { items: b.length } });
      return;
    }
    const n = Math.max(a.length, b.length);
    for (let i = 0; i < n; i++) walk(a[i], b[i], join(path, i), out, skip);
    return;
  }
  if (a === undefined && b === undefined) return;
  if (isPlainObject(a) || isPlainObject(b) || Array.isArray(a) || Array.isArray(b)) {
    if (!jsonEqual(a, b)) out.push({ path, from: summarise(a) ?? null, to: summarise(b) ?? null });
    return;
  }
  if (!sameLeaf(a, b)) out.push({ path, from: a ?? null, to: b ?? null });
}

function summarise(value: unknown): unknown {
  if (isPrimitiveArray(value) && value.length > LONG_ARRAY) return { items: value.length };
  return value;
}

/**
 * Indexes (into `a`) of a longest common subsequence of two sequences of distinct keys. Elements
 * of both sequences outside it are the ones that moved. O(n·m), fine for worksheets (≤ 200 steps).
 */
export function longestCommonSubsequence(a: readonly string[], b: readonly string[]): Set<string> {
  const n = a.length;
  const m = b.length;
  const table: Uint16Array[] = Array.from({ length: n + 1 }, () => new Uint16Array(m + 1));
  for (let i = n - 1; i >= 0; i--) {
    for (let j = m - 1; j >= 0; j--) {
      table[i][j] = a[i] === b[j] ? table[i + 1][j + 1] + 1 : Math.max(table[i + 1][j], table[i][j + 1]);
    }
  }
  const kept = new Set<string>();
  let i = 0;
  let j = 0;
  while (i < n && j < m) {
    if (a[i] === b[j]) {
      kept.add(a[i]);
      i++;
      j++;
    } else if (table[i + 1][j] >= table[i][j + 1]) {
      i++;
    } else {
      j++;
    }
  }
  return kept;
}

/**
 * Rows only in `from` (removed) and only in `to` (added), counting duplicates as a multiset: a row
 * that appears three times before and twice after counts as one removed.
 */
export function rowMultisetChange(from: readonly string[], to: readonly string[]): { added: number; removed: number } {
  const counts = new Map<string, number>();
  for (const key of from) counts.set(key, (counts.get(key) ?? 0) + 1);
  let added = 0;
  for (const key of to) {
    const c = counts.get(key) ?? 0;
    if (c > 0) counts.set(key, c - 1);
    else added++;
  }
  let removed = 0;
  for (const c of counts.values()) removed += c;
  return { added, removed };
}

/** (to − from) / |from|, or null where it has no meaning (missing side, from = 0). */
export function relativeChange(from: number | null, to: number | null): number | null {
  if (from === null || to === null || !Number.isFinite(from) || !Number.isFinite(to)) return null;
  if (from === 0) return to === 0 ? 0 : null;
  return (to - from) / Math.abs(from);
}
