/**
 * Form validation with the shared zod schemas (shared/api.ts), so the client shows the very
 * messages the server would send, before a round trip. Server-side field messages
 * (validation_failed, details.fields) are merged in the same shape.
 */
import type { z } from 'zod';
import { ApiError } from '../api/client';
import type { FieldErrorDetails } from '../../shared/api';

/** One message per field, keyed by dotted path; "" holds messages about the form as a whole. */
export type FieldErrors = Record<string, string>;

export type Validated<T> = { ok: true; data: T; errors: FieldErrors } | { ok: false; errors: FieldErrors };

export function validateWith<S extends z.ZodType>(schema: S, values: unknown): Validated<z.output<S>> {
  const result = schema.safeParse(values);
  if (result.success) return { ok: true, data: result.data, errors: {} };
  const errors: FieldErrors = {};
  for (const issue of result.error.issues) {
    const key = issue.path.map(String).join('.');
    if (!(key in errors)) errors[key] = issue.message;
  }
  return { ok: false, errors };
}

function isFieldDetails(details: unknown): details is FieldErrorDetails {
  if (typeof details !== 'object' || details === null) return false;
  const fields = (details as { fields?: unknown }).fields;
  return typeof fields === 'object' && fields !== null;
}

/** Field messages carried by a server validation error (first message per field). */
export function fieldErrorsFromApi(e: unknown): FieldErrors {
  if (!(e instanceof ApiError) || !isFieldDetails(e.details)) return {};
  const out: FieldErrors = {};
  for (const [key, messages] of Object.entries(e.details.fields)) {
    if (Array.isArray(messages) && typeof messages[0] === 'string') out[key] = messages[0];
  }
  return out;
}
