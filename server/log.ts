import pino, { type Logger } from 'pino';

export type { Logger };

/**
 * Paths that must never reach a log line, whatever a caller passes. Request bodies are not logged at
 * all, so passwords cannot leak through them; these cover headers and objects logged by mistake.
 */
const redact = [
  'req.headers.cookie',
  'req.headers.authorization',
  'req.headers["x-csrf-token"]',
  'res.headers["set-cookie"]',
  '*.password',
  '*.passwordHash',
  '*.password_hash',
  '*.csrfToken',
  'password',
  'passwordHash',
];

export function createLogger(level = process.env.LOG_LEVEL ?? 'info'): Logger {
  return pino({ level, redact: { paths: redact, censor: '[redacted]' }, base: { app: 'spreadproof' } });
}
