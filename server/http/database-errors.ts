/**
 * Errors that mean "the database cannot be reached right now" (stopped, restarting, a connection
 * cut by the administrator or the network) rather than a fault of the request or of the code.
 * The error handler answers them 503 `database_unavailable` with Retry-After, so that clients and
 * load balancers see a passing outage for what it is; the connection pool reconnects by itself.
 */

/** PostgreSQL SQLSTATEs of connection loss: class 08 (connection exception), 57P01–57P03 (shutdown, crash, starting up). */
const unavailableStates = /^(08...|57P0[1-3])$/;
/** Node socket errors of a database host that refuses or drops connections. */
const socketCodes = new Set(['ECONNREFUSED', 'ECONNRESET', 'EPIPE', 'ETIMEDOUT', 'EHOSTUNREACH', 'ENOTCONN']);
/** node-postgres's own messages for a connection that ended under a query or a checkout. */
const poolMessages = /^(Connection terminated|connection terminated|Client has encountered a connection error|timeout exceeded when trying to connect)/;

/** True for a connection-level database failure, looking through wrapped causes (Drizzle wraps pg errors). */
export function isDatabaseUnavailable(error: unknown): boolean {
  let current: unknown = error;
  for (let depth = 0; depth < 6 && current; depth++) {
    const e = current as { code?: unknown; message?: unknown; cause?: unknown; errors?: unknown[] };
    if (typeof e.code === 'string' && (unavailableStates.test(e.code) || socketCodes.has(e.code))) return true;
    if (typeof e.message === 'string' && poolMessages.test(e.message)) return true;
    if (Array.isArray(e.errors) && e.errors.some((inner) => isDatabaseUnavailable(inner))) return true;
    current = e.cause;
  }
  return false;
}

export const databaseUnavailableMessage = 'The database cannot be reached at the moment. Nothing was changed; try again in a few seconds.';
