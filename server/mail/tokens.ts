/**
 * Tokens for mailed links: 32 random bytes (base64url, 43 characters). Only the SHA-256 of a token
 * is stored, so the database alone never lets anyone use a link.
 */
import { createHash, randomBytes } from 'node:crypto';

export function hashToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}

export function newToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, hash: hashToken(token) };
}
