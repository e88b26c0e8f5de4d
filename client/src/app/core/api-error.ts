/**
 * The one error shape the client works with. The API answers every failure with
 * `{ error: { code, message, details? } }`, validation `details` being `[{ field, message }]`;
 * the HTTP interceptor turns each failed response into an `ApiError` so that pages and forms can
 * show the server's message, and put field messages on the matching form fields.
 *
 * No Angular imports here: this file is unit-tested under mocha.
 */

export interface FieldError {
  readonly field: string;
  readonly message: string;
}

export class ApiError extends Error {
  override readonly name = 'ApiError';

  constructor(
    /** HTTP status; 0 when the server could not be reached. */
    readonly status: number,
    /** Machine-readable code from the server (`bad_credentials`, `last_owner`, ...) or a client one. */
    readonly code: string,
    message: string,
    /** Validation messages by field name (empty when the error is not about fields). */
    readonly fieldErrors: readonly FieldError[] = [],
    /** The raw `details` value, for codes that carry something other than field errors. */
    readonly details: unknown = undefined,
  ) {
    super(message);
  }

  /** The message for one field, if the server named it. */
  fieldMessage(field: string): string | undefined {
    return this.fieldErrors.find((e) => e.field === field)?.message;
  }
}

/** Codes the client itself assigns when the server gave no usable error body. */
export const CLIENT_ERROR_CODES = {
  network: 'network',
  unexpected: 'unexpected',
} as const;

const STATUS_MESSAGES: Readonly<Record<number, string>> = {
  400: 'The request was not accepted.',
  401: 'Please sign in again.',
  403: 'You do not have permission to do that.',
  404: 'Not found.',
  409: 'That conflicts with the current state. Reload and try again.',
  413: 'That is too large to send.',
  429: 'Too many attempts. Wait a moment and try again.',
};

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function parseFieldErrors(details: unknown): FieldError[] {
  if (!Array.isArray(details)) return [];
  const out: FieldError[] = [];
  for (const item of details) {
    if (isRecord(item) && typeof item['field'] === 'string' && typeof item['message'] === 'string') {
      out.push({ field: item['field'], message: item['message'] });
    }
  }
  return out;
}

/**
 * Builds an `ApiError` from a failed response's status and body. The body may be the parsed JSON
 * error, a JSON string (when the response type was text), or anything else a proxy may send.
 */
export function apiErrorFromResponse(status: number, body: unknown): ApiError {
  if (status === 0) {
    return new ApiError(0, CLIENT_ERROR_CODES.network, 'Cannot reach the Spreadproof server. Check the connection and try again.');
  }
  let parsed = body;
  if (typeof parsed === 'string') {
    try {
      parsed = JSON.parse(parsed);
    } catch {
      parsed = undefined;
    }
  }
  const error = isRecord(parsed) ? parsed['error'] : undefined;
  if (isRecord(error) && typeof error['code'] === 'string') {
    const message =
      typeof error['message'] === 'string' && error['message'].trim() !== ''
        ? error['message']
        : (STATUS_MESSAGES[status] ?? 'Something went wrong.');
    return new ApiError(status, error['code'], message, parseFieldErrors(error['details']), error['details']);
  }
  const fallback =
    STATUS_MESSAGES[status] ?? (status >= 500 ? 'The server had a problem. Try again in a moment.' : 'Something went wrong.');
  return new ApiError(status, CLIENT_ERROR_CODES.unexpected, fallback);
}

/** Any thrown value as an `ApiError` (pages call this in `catch` so they never show `[object Object]`). */
export function toApiError(value: unknown): ApiError {
  if (value instanceof ApiError) return value;
  // HttpErrorResponse, duck-typed so this file stays free of Angular.
  if (isRecord(value) && typeof value['status'] === 'number' && 'error' in value) {
    return apiErrorFromResponse(value['status'], value['error']);
  }
  const message = value instanceof Error && value.message ? value.message : 'Something went wrong.';
  return new ApiError(-1, CLIENT_ERROR_CODES.unexpected, message);
}

/**
 * Splits an error's field messages into those that belong to one of `knownFields` (to show on the
 * field) and a form-level message for the rest (the error's own message plus any field message the
 * form has no field for).
 */
export function splitFieldErrors(
  error: ApiError,
  knownFields: readonly string[],
): { byField: Record<string, string>; formMessage: string | null } {
  const byField: Record<string, string> = {};
  const orphans: string[] = [];
  for (const { field, message } of error.fieldErrors) {
    if (knownFields.includes(field)) {
      byField[field] ??= message;
    } else {
      orphans.push(field ? `${field}: ${message}` : message);
    }
  }
  const placed = Object.keys(byField).length > 0;
  let formMessage: string | null = placed && orphans.length === 0 ? null : error.message;
  if (orphans.length > 0) formMessage = [error.message, ...orphans].join(' ');
  return { byField, formMessage };
}
