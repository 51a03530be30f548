/**
 * The one typed API client. Every call goes to the same origin under /api with the session
 * cookie (credentials: 'include'). A response that is not 2xx throws an ApiError carrying the
 * code, message and details of the server's `{ error }` body (shared/api.ts, ApiErrorBody).
 */
import type { ApiErrorBody } from '../../shared/api';

let apiBase = '/api';

/** Change the base URL (a native build or a test pointing at another origin). */
export function setApiBase(base: string): void {
  apiBase = base.replace(/\/+$/, '');
}
export function getApiBase(): string {
  return apiBase;
}

export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  readonly details: unknown;
  constructor(status: number, code: string, message: string, details?: unknown) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.code = code;
    this.details = details;
  }
}

export function isApiError(e: unknown): e is ApiError {
  return e instanceof ApiError;
}

function isErrorBody(body: unknown): body is ApiErrorBody {
  if (typeof body !== 'object' || body === null || !('error' in body)) return false;
  const err = (body as { error: unknown }).error;
  return typeof err === 'object' && err !== null && typeof (err as { message?: unknown }).message === 'string';
}

const fallbackMessages: Record<number, string> = {
  400: 'The request was not accepted.',
  401: 'Please sign in.',
  403: 'You do not have permission to do that.',
  404: 'Not found.',
  409: 'That conflicts with the current state. Reload and try again.',
  429: 'Too many attempts. Wait a minute and try again.',
};

/** Turn a non-2xx response into an ApiError, whatever its body. */
export async function errorFromResponse(res: Response): Promise<ApiError> {
  let body: unknown = undefined;
  try {
    const raw = await res.text();
    body = raw ? JSON.parse(raw) : undefined;
  } catch {
    body = undefined;
  }
  if (isErrorBody(body)) {
    return new ApiError(res.status, body.error.code || `http_${res.status}`, body.error.message, body.error.details);
  }
  const message = fallbackMessages[res.status] ?? `The server answered with status ${res.status}. Try again in a moment.`;
  return new ApiError(res.status, `http_${res.status}`, message);
}

type Method = 'GET' | 'POST' | 'PATCH' | 'DELETE';

/**
 * Called when any request learns that the session is over (401 session_ended or token_expired),
 * with the server's sentence. The session provider listens and returns to sign-in.
 */
type SessionEndedListener = (message: string) => void;
const sessionEndedListeners = new Set<SessionEndedListener>();
export function onSessionEnded(listener: SessionEndedListener): () => void {
  sessionEndedListeners.add(listener);
  return () => sessionEndedListeners.delete(listener);
}
const ENDED_CODES = new Set(['session_ended', 'token_expired']);

export async function request<T>(method: Method, path: string, body?: unknown): Promise<T> {
  if (!path.startsWith('/')) throw new Error(`api: path must start with "/", got "${path}"`);
  const headers: Record<string, string> = { Accept: 'application/json' };
  const init: RequestInit = { method, headers, credentials: 'include' };
  if (body !== undefined) {
    headers['Content-Type'] = 'application/json';
    init.body = JSON.stringify(body);
  }
  let res: Response;
  try {
    res = await fetch(apiBase + path, init);
  } catch {
    throw new ApiError(0, 'network', 'Cannot reach the Wavefit server. Check your connection and try again.');
  }
  if (!res.ok) {
    const error = await errorFromResponse(res);
    // GET /auth/me reports its own answer to the session provider; telling it again would loop.
    if (error.status === 401 && ENDED_CODES.has(error.code) && path !== '/auth/me') {
      for (const listener of sessionEndedListeners) listener(error.message);
    }
    throw error;
  }
  if (res.status === 204) return undefined as T;
  const raw = await res.text();
  if (!raw) return undefined as T;
  try {
    return JSON.parse(raw) as T;
  } catch {
    throw new ApiError(res.status, 'bad_response', 'The server sent an answer Wavefit could not read.');
  }
}

export const api = {
  get: <T>(path: string) => request<T>('GET', path),
  post: <T>(path: string, body?: unknown) => request<T>('POST', path, body ?? {}),
  patch: <T>(path: string, body: unknown) => request<T>('PATCH', path, body),
  del: <T = void>(path: string) => request<T>('DELETE', path),
};

/** The swr fetcher: the cache key is the API path. */
export function fetcher<T>(path: string): Promise<T> {
  return api.get<T>(path);
}

/** A sentence for any thrown value, for banners. */
export function messageOf(e: unknown): string {
  if (e instanceof ApiError) return e.message;
  if (e instanceof Error) return e.message;
  return 'Something went wrong. Try again.';
}
