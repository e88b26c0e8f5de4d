/**
 * Password hashing with scrypt (node:crypto): a random 16-byte salt per password, parameters stored
 * in the hash so they can be raised later without breaking existing accounts, constant-time compare.
 * Format: `scrypt$N$r$p$<salt base64url>$<key base64url>`.
 */
import { randomBytes, scrypt, timingSafeEqual, type ScryptOptions } from 'node:crypto';

const defaults = { N: 2 ** 15, r: 8, p: 1 };
const keyLength = 32;
const saltLength = 16;

function derive(password: string, salt: Buffer, options: { N: number; r: number; p: number }): Promise<Buffer> {
  const scryptOptions: ScryptOptions = { ...options, maxmem: 256 * options.N * options.r * options.p };
  return new Promise((resolve, reject) =>
    scrypt(password.normalize('NFKC'), salt, keyLength, scryptOptions, (error, key) =>
      error ? reject(error) : resolve(key),
    ),
  );
}

export async function hashPassword(password: string): Promise<string> {
  const salt = randomBytes(saltLength);
  const key = await derive(password, salt, defaults);
  return ['scrypt', defaults.N, defaults.r, defaults.p, salt.toString('base64url'), key.toString('base64url')].join('$');
}

export async function verifyPassword(password: string, stored: string): Promise<boolean> {
  const parts = stored.split('$');
  if (parts.length !== 6 || parts[0] !== 'scrypt') return false;
  const [N, r, p] = parts.slice(1, 4).map(Number);
  if (![N, r, p].every((value) => Number.isInteger(value) && value > 0)) return false;
  const salt = Buffer.from(parts[4], 'base64url');
  const expected = Buffer.from(parts[5], 'base64url');
  const actual = await derive(password, salt, { N, r, p });
  return actual.length === expected.length && timingSafeEqual(actual, expected);
}

/**
 * A hash of a random password, checked when the e-mail is unknown so that an unknown address
 * costs the same time as a wrong password.
 */
let decoy: Promise<string> | undefined;
export function decoyHash(): Promise<string> {
  decoy ??= hashPassword(randomBytes(18).toString('base64url'));
  return decoy;
}
