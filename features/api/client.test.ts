import { afterEach, describe, expect, it, vi } from 'vitest';
import { api, ApiError, setApiBase } from './client';

// The client is checked against the API contract (shared/api.ts: errors are
// { error: { code, message, details? } }; 204 has no body) and against HTTP itself
// (RFC 9110: a 204 response carries no content; any status outside 2xx is not a success).
// fetch is replaced by a recorder that answers with real WHATWG Response objects.
function answer(status: number, body?: unknown, raw?: string) {
  const calls: { url: string; init: RequestInit }[] = [];
  vi.stubGlobal('fetch', async (url: string, init: RequestInit) => {
    calls.push({ url, init });
    const text = raw ?? (body === undefined ? null : JSON.stringify(body));
    return new Response(status === 204 ? null : text, { status, headers: { 'Content-Type': 'application/json' } });
  });
  return calls;
}

afterEach(() => {
  vi.unstubAllGlobals();
  setApiBase('/api');
});

describe('api client', () => {
  it('calls the same-origin /api path with the session cookie and a JSON body', async () => {
    const calls = answer(200, { study: { id: 7 } });
    const out = await api.post<{ study: { id: number } }>('/studies', { name: 'Night watch' });
    expect(out.study.id).toBe(7);
    expect(calls[0].url).toBe('/api/studies');
    expect(calls[0].init.method).toBe('POST');
    expect(calls[0].init.credentials).toBe('include');
    expect((calls[0].init.headers as Record<string, string>)['Content-Type']).toBe('application/json');
    expect(JSON.parse(String(calls[0].init.body))).toEqual({ name: 'Night watch' });
  });

  it('throws an ApiError carrying code, message and details of the error body', async () => {
    const details = { fields: { name: ['A study name needs at least 3 characters.'] } };
    answer(400, { error: { code: 'validation_failed', message: 'The request was not accepted: name: …', details } });
    const e = await api.post('/studies', { name: 'ab' }).catch((x: unknown) => x);
    expect(e).toBeInstanceOf(ApiError);
    expect(e).toMatchObject({ status: 400, code: 'validation_failed', details });
    expect((e as ApiError).message).toMatch(/^The request was not accepted/);
  });

  it('gives a plain sentence when an error answer is not JSON (a proxy page, say)', async () => {
    answer(502, undefined, '<html>Bad gateway</html>');
    const e = (await api.get('/studies').catch((x: unknown) => x)) as ApiError;
    expect(e.code).toBe('http_502');
    expect(e.message).toMatch(/status 502/);
  });

  it('reports an unreachable server as a network error', async () => {
    vi.stubGlobal('fetch', async () => {
      throw new TypeError('Failed to fetch');
    });
    const e = (await api.get('/auth/me').catch((x: unknown) => x)) as ApiError;
    expect(e).toMatchObject({ status: 0, code: 'network' });
  });

  it('returns undefined for 204 No Content', async () => {
    answer(204);
    await expect(api.del('/studies/1/invitations/2')).resolves.toBeUndefined();
  });

  it('refuses a path that is not absolute, before any request', async () => {
    const calls = answer(200, {});
    await expect(api.get('studies')).rejects.toThrow(/api: path must start with "\/"/);
    expect(calls).toHaveLength(0);
  });
});
