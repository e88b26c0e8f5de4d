import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { dataDir } from './paths';

export const defaultPort = 4300;
export const host = '127.0.0.1';

export function configuredPort(): number {
  const raw = process.env.PORT;
  if (raw === undefined || raw === '') return defaultPort;
  const port = Number(raw);
  if (!Number.isInteger(port) || port < 0 || port > 65535) throw new Error(`PORT must be a port number, not "${raw}".`);
  return port;
}

export const isProduction = () => process.env.NODE_ENV === 'production';

/**
 * SESSION_SECRET if set; otherwise a random secret kept in .data/session-secret so that sessions
 * survive a restart of the development server.
 */
export function sessionSecret(): string {
  if (process.env.SESSION_SECRET) return process.env.SESSION_SECRET;
  const file = path.join(dataDir, 'session-secret');
  if (existsSync(file)) return readFileSync(file, 'utf8').trim();
  mkdirSync(dataDir, { recursive: true, mode: 0o755 });
  const secret = randomBytes(32).toString('base64url');
  writeFileSync(file, `${secret}\n`, { mode: 0o600 });
  return secret;
}

/** SPREADPROOF_AUTH_RATE_LIMIT: failed sign-ins (and sign-ups) allowed per address per 15 minutes. */
export function authRateLimitFromEnv(): { windowMs: number; limit: number } | undefined {
  const limit = Number(process.env.SPREADPROOF_AUTH_RATE_LIMIT);
  return Number.isInteger(limit) && limit > 0 ? { windowMs: 15 * 60 * 1000, limit } : undefined;
}
