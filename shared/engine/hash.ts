// Canonical JSON and SHA-256: the two halves of every content hash and results hash.
//
// The canonical form is the one of RFC 8785 (JSON Canonicalization Scheme) for the values the
// engine produces: object keys sorted by UTF-16 code units, no whitespace, numbers printed with
// ECMAScript Number::toString (the shortest string that round-trips, which the language
// specification fixes exactly, so every conforming engine prints the same digits), strings
// escaped as JSON.stringify escapes them. On top of that, values JSON would silently change are
// refused instead: NaN and ±Infinity (JSON.stringify writes them as null), bigint, functions,
// symbols and `undefined` inside arrays each throw a TypeError naming the path of the value.
// `undefined` object members are dropped, as JSON.stringify drops them, so an optional field that
// is absent and one that is explicitly undefined hash the same.
import { sha256 } from '@noble/hashes/sha2.js';
import { bytesToHex, utf8ToBytes } from '@noble/hashes/utils.js';

type TypedNumberArray =
  | Float64Array
  | Float32Array
  | Int8Array
  | Int16Array
  | Int32Array
  | Uint8Array
  | Uint8ClampedArray
  | Uint16Array
  | Uint32Array;

/** Serialises `value` canonically (see the module comment). Throws TypeError on non-JSON values. */
export function canonicalJson(value: unknown): string {
  const out: string[] = [];
  write(value, [], out, new Set());
  return out.join('');
}

/** SHA-256 of UTF-8 text or raw bytes as 64 lower-case hex digits. */
export type Sha256Hex = (input: string | Uint8Array) => string;

const pureSha256Hex: Sha256Hex = (input) => bytesToHex(sha256(typeof input === 'string' ? utf8ToBytes(input) : input));
let sha256Impl: Sha256Hex = pureSha256Hex;

/**
 * Lets a runtime with a native SHA-256 supply it (the server and its evaluation threads install
 * node:crypto's, server/native-hash.ts: a results document of 200 kB hashes in 0.3 ms instead of
 * several ms). It must compute the same function: the hashes are stored and compared forever.
 * The pure implementation (@noble/hashes) stays the default for the browser and the CLI.
 */
export function useSha256(impl: Sha256Hex): void {
  sha256Impl = impl;
}

/** The pure implementation, whatever useSha256 installed (tests compare the two). */
export const sha256HexPure: Sha256Hex = pureSha256Hex;

/** SHA-256 of UTF-8 text or raw bytes, as 64 lower-case hex digits. Pure; browser and node. */
export function sha256Hex(input: string | Uint8Array): string {
  return sha256Impl(input);
}

/** SHA-256 hex of the canonical JSON of `value`: the hash used for contents and results. */
export function canonicalHash(value: unknown): string {
  return sha256Hex(canonicalJson(value));
}

/**
 * The path of the value being written, as member names and indices from the root; turned into
 * text ($.steps[2].value) only for an error message, so that writing costs no string per value.
 */
type PathStack = (string | number)[];

function pathText(path: PathStack, last?: string | number): string {
  let text = '$';
  for (const segment of last === undefined ? path : [...path, last]) text += typeof segment === 'number' ? `[${segment}]` : memberPath(segment);
  return text;
}

function formatNumber(n: number, path: PathStack, last?: string | number): string {
  if (!Number.isFinite(n)) {
    throw new TypeError(`canonicalJson: non-finite number ${String(n)} at ${pathText(path, last)}`);
  }
  // Number::toString already prints -0 as "0" and integers below 1e21 without an exponent.
  return String(n);
}

function isTypedNumberArray(value: unknown): value is TypedNumberArray {
  return ArrayBuffer.isView(value) && !(value instanceof DataView) && !isBigIntArray(value);
}

function isBigIntArray(value: unknown): boolean {
  return value instanceof BigInt64Array || value instanceof BigUint64Array;
}

function write(value: unknown, path: PathStack, out: string[], ancestors: Set<object>): void {
  if (value === null) {
    out.push('null');
    return;
  }
  switch (typeof value) {
    case 'boolean':
      out.push(value ? 'true' : 'false');
      return;
    case 'number':
      out.push(formatNumber(value, path));
      return;
    case 'string':
      out.push(JSON.stringify(value));
      return;
    case 'object':
      break;
    default:
      throw new TypeError(`canonicalJson: cannot serialise a ${typeof value} at ${pathText(path)}`);
  }

  const obj = value as object;
  if (isTypedNumberArray(obj)) {
    out.push('[');
    for (let i = 0; i < obj.length; i++) {
      if (i > 0) out.push(',');
      out.push(formatNumber(obj[i], path, i));
    }
    out.push(']');
    return;
  }
  if (ArrayBuffer.isView(obj)) {
    throw new TypeError(`canonicalJson: cannot serialise a ${obj.constructor.name} at ${pathText(path)}`);
  }
  if (ancestors.has(obj)) {
    throw new TypeError(`canonicalJson: circular reference at ${pathText(path)}`);
  }
  const toJSON = (obj as { toJSON?: unknown }).toJSON;
  if (typeof toJSON === 'function') {
    ancestors.add(obj);
    write((toJSON as () => unknown).call(obj), path, out, ancestors);
    ancestors.delete(obj);
    return;
  }

  ancestors.add(obj);
  if (Array.isArray(obj)) {
    out.push('[');
    for (let i = 0; i < obj.length; i++) {
      if (i > 0) out.push(',');
      const item: unknown = obj[i];
      if (item === undefined) {
        throw new TypeError(`canonicalJson: undefined array element at ${pathText(path, i)}`);
      }
      path.push(i);
      write(item, path, out, ancestors);
      path.pop();
    }
    out.push(']');
  } else {
    if (obj instanceof Map || obj instanceof Set) {
      throw new TypeError(`canonicalJson: cannot serialise a ${obj.constructor.name} at ${pathText(path)}`);
    }
    const record = obj as Record<string, unknown>;
    // Default sort compares UTF-16 code units, which is the order RFC 8785 prescribes.
    const keys = Object.keys(record)
      .filter((k) => record[k] !== undefined)
      .sort();
    out.push('{');
    for (let i = 0; i < keys.length; i++) {
      if (i > 0) out.push(',');
      const key = keys[i];
      out.push(JSON.stringify(key), ':');
      path.push(key);
      write(record[key], path, out, ancestors);
      path.pop();
    }
    out.push('}');
  }
  ancestors.delete(obj);
}

function memberPath(key: string): string {
  return /^[A-Za-z_$][A-Za-z0-9_$]*$/.test(key) ? `.${key}` : `[${JSON.stringify(key)}]`;
}
