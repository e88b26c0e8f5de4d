import type { ErrorRequestHandler, RequestHandler } from 'express';
import type { Logger } from 'pino';
import { z } from 'zod';
import { databaseUnavailableMessage, isDatabaseUnavailable } from './database-errors';

export interface FieldProblem {
  field: string;
  message: string;
}

/** Every API failure leaves the server as `{ error: { code, message, details? } }` with this status. */
export class HttpError extends Error {
  override name = 'HttpError';
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
  }
}

export const notFound = (message = 'Nothing was found at this address.') => new HttpError(404, 'not_found', message);
export const forbidden = (message = 'Your role in this team does not allow this.') =>
  new HttpError(403, 'forbidden', message);
export const unauthorized = (message = 'Sign in to continue.') => new HttpError(401, 'unauthorized', message);
export const conflict = (code: string, message: string) => new HttpError(409, code, message);

/** A zod failure as a 400 naming each offending field (dotted path; `(body)` for the whole body). */
export function validationError(error: z.ZodError, where: string): HttpError {
  const details: FieldProblem[] = error.issues.map((issue) => ({
    field: issue.path.length > 0 ? issue.path.map(String).join('.') : `(${where})`,
    message: issue.message,
  }));
  const fields = [...new Set(details.map((d) => d.field))].join(', ');
  return new HttpError(400, 'validation', `Check these fields: ${fields}.`, details);
}

export function sendError(res: Parameters<RequestHandler>[1], error: HttpError): void {
  const body: { code: string; message: string; details?: unknown } = { code: error.code, message: error.message };
  if (error.details !== undefined) body.details = error.details;
  res.status(error.status).json({ error: body });
}

/** Unknown /api paths. */
export const apiNotFound: RequestHandler = (req, res) => {
  sendError(res, new HttpError(404, 'not_found', `There is no API route ${req.method} ${req.originalUrl.split('?')[0]}.`));
};

interface BodyParserError {
  type?: string;
  status?: number;
  expose?: boolean;
}

/** The one error handler, after every route. Never sends a stack trace. */
export function errorHandler(logger: Logger): ErrorRequestHandler {
  return (error: unknown, req, res, next) => {
    if (res.headersSent) {
      // express-session stores or touches the session after the answer has been written; when the
      // database is down that write fails here. The answer is already complete: log it, and do not
      // hand the error on (Express's final handler would print the stack and cut the connection).
      if (isDatabaseUnavailable(error)) {
        logger.warn({ method: req.method, path: req.path, reason: (error as Error).message }, 'session not stored: database unavailable');
        return;
      }
      next(error);
      return;
    }
    if (error instanceof HttpError) {
      sendError(res, error);
      return;
    }
    if (error instanceof z.ZodError) {
      sendError(res, validationError(error, 'body'));
      return;
    }
    const parserError = error as BodyParserError;
    if (parserError.type === 'entity.too.large') {
      sendError(res, new HttpError(413, 'payload_too_large', 'The request body is too large.'));
      return;
    }
    if (parserError.type === 'entity.parse.failed') {
      sendError(res, new HttpError(400, 'bad_json', 'The request body is not valid JSON.'));
      return;
    }
    if (typeof parserError.status === 'number' && parserError.status >= 400 && parserError.status < 500 && parserError.expose) {
      sendError(res, new HttpError(parserError.status, 'bad_request', 'The request could not be read.'));
      return;
    }
    if (isDatabaseUnavailable(error)) {
      logger.warn({ method: req.method, path: req.path, reason: (error as Error).message }, 'database unavailable');
      // The session store lives in the same database (connect-pg-simple): drop this request's
      // session, so that express-session neither sends a cookie for a session it could not store
      // nor tries to write it again after this answer.
      (req as { session?: unknown }).session = undefined;
      res.setHeader('Retry-After', '5');
      sendError(res, new HttpError(503, 'database_unavailable', databaseUnavailableMessage));
      return;
    }
    logger.error({ err: error, method: req.method, path: req.path }, 'unhandled error');
    sendError(res, new HttpError(500, 'internal', 'Something went wrong on the server. The error has been logged.'));
  };
}
