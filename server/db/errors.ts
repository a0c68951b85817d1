/** Telling database errors apart: "not reachable right now" versus everything else. */

const TRANSIENT_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'ETIMEDOUT',
  'EPIPE',
  'EHOSTUNREACH',
  'ENOTFOUND',
  'EAI_AGAIN',
  'PROTOCOL_CONNECTION_LOST',
  'PROTOCOL_SEQUENCE_TIMEOUT',
  'PROTOCOL_ENQUEUE_AFTER_FATAL_ERROR',
  'ER_SERVER_SHUTDOWN',
  'ER_CON_COUNT_ERROR',
  'ER_CONNECTION_KILLED',
  'ER_QUERY_INTERRUPTED',
  'ER_NORMAL_SHUTDOWN',
  'ER_SHUTDOWN_COMPLETE',
]);

/** Lock conflicts: the statement may succeed when tried again, though the database is up. */
const LOCK_CODES = new Set(['ER_LOCK_DEADLOCK', 'ER_LOCK_WAIT_TIMEOUT']);

/** True when the database could not be reached (or dropped the connection). */
export function isDbUnreachable(err: unknown): boolean {
  return matches(err, TRANSIENT_CODES, true);
}

/** True for connection-level failures and lock conflicts worth trying again. */
export function isTransientDbError(err: unknown): boolean {
  return matches(err, TRANSIENT_CODES, true) || matches(err, LOCK_CODES, false);
}

function matches(err: unknown, codes: Set<string>, closedMessages: boolean): boolean {
  // Drizzle wraps driver errors ("Failed query: …") with the driver's error as `cause`.
  for (let e: unknown = err, depth = 0; e && depth < 5; e = (e as { cause?: unknown }).cause, depth++) {
    const code = (e as { code?: unknown }).code;
    if (typeof code === 'string' && codes.has(code)) return true;
    const msg = (e as { message?: unknown }).message;
    if (closedMessages && typeof msg === 'string' && /connection (is in closed state|lost)|can't add new command when connection is in closed state/i.test(msg)) return true;
  }
  return false;
}

