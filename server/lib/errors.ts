/**
 * Errors of the services (data, checks, runs) that say what went wrong without knowing about HTTP:
 * the run worker meets them as plain errors with a message, and the HTTP error handler maps each
 * kind to a status and code (server/http/error-handler.ts).
 */
export type DomainErrorKind = 'invalid' | 'not_found' | 'conflict' | 'time_limit' | 'busy';

export class DomainError extends Error {
  constructor(
    readonly kind: DomainErrorKind,
    message: string,
    /** Request fields at fault, when the input came from a request. */
    readonly fields?: Record<string, string>,
  ) {
    super(message);
    this.name = 'DomainError';
  }
}
