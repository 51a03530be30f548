/**
 * API errors: the one error type services and routes throw for a refusal (ApiError: status, code,
 * plain message, details), and the Express handlers that turn anything thrown into the contract's
 * shape { error: { code, message, details? } } (shared/api.ts ApiErrorBody), once, in errorHandler.
 * Express 5 passes errors thrown by async handlers to it, so routes need no try/catch of their own.
 * Stack traces never reach the client.
 */
import type { ErrorRequestHandler, NextFunction, Request, RequestHandler, Response } from 'express';
import type { ZodError, ZodType } from 'zod';
import type { ApiErrorBody, ApiErrorCode, FieldErrorDetails } from '../shared/api';

export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: ApiErrorCode,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'ApiError';
  }
}

export const badRequest = (message: string, details?: unknown, code: ApiErrorCode = 'bad_request') =>
  new ApiError(400, code, message, details);
export const unauthorized = (code: ApiErrorCode, message: string) => new ApiError(401, code, message);
export const forbidden = (message: string) => new ApiError(403, 'forbidden', message);
export const notFound = (message: string, code: ApiErrorCode = 'not_found') => new ApiError(404, code, message);
export const conflict = (code: ApiErrorCode, message: string, details?: unknown) =>
  new ApiError(409, code, message, details);

/** Turns a zod error into field messages keyed by dotted path ("" for the body as a whole). */
export function fieldErrors(error: ZodError): FieldErrorDetails {
  const fields: Record<string, string[]> = {};
  for (const issue of error.issues) {
    const key = issue.path.map(String).join('.');
    (fields[key] ??= []).push(issue.message);
  }
  return { fields };
}

function describeFields(details: FieldErrorDetails): string {
  const parts = Object.entries(details.fields).map(([field, messages]) =>
    field ? `${field}: ${messages.join(' ')}` : messages.join(' '),
  );
  return parts.join('; ');
}

/**
 * Validates req.body with a zod schema from shared/; on success req.body holds the parsed
 * (trimmed, defaulted) value, on failure the request ends with 400 validation_failed and the
 * messages per field in details.fields.
 */
export function validate(schema: ZodType): RequestHandler {
  return (req: Request, _res: Response, next: NextFunction) => {
    if (req.body === undefined) {
      next(badRequest('This request needs a JSON body (Content-Type: application/json).', undefined, 'validation_failed'));
      return;
    }
    const result = schema.safeParse(req.body);
    if (!result.success) {
      const details = fieldErrors(result.error);
      next(badRequest(`The request was not accepted: ${describeFields(details)}`, details, 'validation_failed'));
      return;
    }
    req.body = result.data;
    next();
  };
}

/** Parses a positive whole-number route parameter; anything else is "not found". */
export function idParam(req: Request, name: string, what: string): number {
  const raw = req.params[name];
  const value = typeof raw === 'string' && /^[1-9][0-9]{0,15}$/.test(raw) ? Number(raw) : NaN;
  if (!Number.isSafeInteger(value)) throw notFound(`${what} not found.`);
  return value;
}

/** The 404 for any /api path no router claimed. */
export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(notFound(`There is no API endpoint ${req.method} ${req.originalUrl.split('?')[0]}.`));
};

interface BodyParserError extends Error {
  type?: string;
  status?: number;
  limit?: number;
}

export type ErrorLogger = (error: unknown, req: Request) => void;

const defaultLogger: ErrorLogger = (error, req) => {
  console.error(`[wavefit] ${req.method} ${req.originalUrl} failed:`, error);
};

/** The last middleware: every error becomes { error: { code, message, details? } }. */
export function errorHandler(log: ErrorLogger = defaultLogger): ErrorRequestHandler {
  return (err: unknown, req, res, next) => {
    if (res.headersSent) {
      next(err);
      return;
    }
    let status = 500;
    let body: ApiErrorBody = {
      error: { code: 'internal', message: 'Something went wrong on the server. The problem has been logged.' },
    };
    const parserError = err as BodyParserError;
    if (err instanceof ApiError) {
      status = err.status;
      body = { error: { code: err.code, message: err.message } };
      if (err.details !== undefined) body.error.details = err.details;
    } else if (parserError?.type === 'entity.parse.failed') {
      status = 400;
      body = {
        error: { code: 'malformed_json', message: `The request body is not valid JSON (${parserError.message}).` },
      };
    } else if (parserError?.type === 'entity.too.large') {
      status = 413;
      const mb = parserError.limit ? ` (limit ${(parserError.limit / 1_048_576).toFixed(0)} MB)` : '';
      body = { error: { code: 'payload_too_large', message: `The request body is too large${mb}.` } };
    } else if (parserError?.type === 'encoding.unsupported' || parserError?.type === 'charset.unsupported') {
      status = 415;
      body = { error: { code: 'bad_request', message: 'The request body must be UTF-8 encoded JSON.' } };
    } else if (typeof parserError?.status === 'number' && parserError.status >= 400 && parserError.status < 500) {
      status = parserError.status;
      body = { error: { code: 'bad_request', message: parserError.message || 'The request was not accepted.' } };
    } else {
      log(err, req);
    }
    res.status(status).json(body);
  };
}
