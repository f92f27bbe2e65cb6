import { afterEach, describe, expect, it, vi } from 'vitest';
import { ApiError, api, fieldErrorsFromDetails, setCsrfTokenProvider } from '@/lib/api-client';

function jsonResponse(status: number, body: unknown): Response {
  return new Response(body === undefined ? null : JSON.stringify(body), {
    status,
    headers: { 'Content-Type': 'application/json' },
  });
}

afterEach(() => {
  vi.unstubAllGlobals();
  setCsrfTokenProvider(async () => undefined);
});

describe('api client', () => {
  it('sends JSON with same-origin credentials and the CSRF header only on state-changing calls', async () => {
    const fetchMock = vi.fn(async () => jsonResponse(200, { ok: true }));
    vi.stubGlobal('fetch', fetchMock);
    setCsrfTokenProvider(async () => 'tok-1');

    await api.get('/api/instruments');
    await api.post('/api/instruments', { name: 'x' });

    const [getUrl, getInit] = fetchMock.mock.calls[0] as unknown as [string, RequestInit];
    expect(getUrl).toBe('/api/instruments');
    expect(getInit.credentials).toBe('same-origin');
    expect((getInit.headers as Record<string, string>)['X-CSRF-Token']).toBeUndefined();

    const [, postInit] = fetchMock.mock.calls[1] as unknown as [string, RequestInit];
    expect(postInit.method).toBe('POST');
    expect((postInit.headers as Record<string, string>)['X-CSRF-Token']).toBe('tok-1');
    expect((postInit.headers as Record<string, string>)['Content-Type']).toBe('application/json');
    expect(postInit.body).toBe('{"name":"x"}');
  });

  it('turns the error shape into an ApiError with status, code, message and details', async () => {
    const details = { issues: [{ path: 'profile.pixelCount', message: 'pixelCount must be at least 2' }] };
    vi.stubGlobal('fetch', vi.fn(async () => jsonResponse(400, { error: { code: 'validation', message: 'Check the fields', details } })));
    const error = await api.post('/api/instruments', {}).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiError);
    expect(error).toMatchObject({ status: 400, code: 'validation', message: 'Check the fields', details });
  });

  it('gives a plain rate-limit message when a 429 has no JSON body', async () => {
    vi.stubGlobal('fetch', vi.fn(async () => new Response('Too many requests', { status: 429 })));
    const error = (await api.post('/api/session', {}).catch((e: unknown) => e)) as ApiError;
    expect(error.status).toBe(429);
    expect(error.code).toBe('rate_limited');
    expect(error.message).toMatch(/too many attempts/i);
  });

  it('retries a csrf refusal once with a refreshed token', async () => {
    const fetchMock = vi
      .fn()
      .mockResolvedValueOnce(jsonResponse(403, { error: { code: 'csrf', message: 'Bad CSRF token' } }))
      .mockResolvedValueOnce(jsonResponse(201, { id: 'a' }));
    vi.stubGlobal('fetch', fetchMock);
    const provider = vi.fn(async ({ refresh }: { refresh: boolean }) => (refresh ? 'fresh' : 'stale'));
    setCsrfTokenProvider(provider);

    await expect(api.post('/api/tokens', { name: 'n' })).resolves.toEqual({ id: 'a' });
    const tokens = fetchMock.mock.calls.map((c) => ((c[1] as RequestInit).headers as Record<string, string>)['X-CSRF-Token']);
    expect(tokens).toEqual(['stale', 'fresh']);
  });

  it('does not retry a plain forbidden', async () => {
    const fetchMock = vi.fn(async () => jsonResponse(403, { error: { code: 'forbidden', message: 'Owners only' } }));
    vi.stubGlobal('fetch', fetchMock);
    await expect(api.delete('/api/instruments/1')).rejects.toMatchObject({ code: 'forbidden' });
    expect(fetchMock).toHaveBeenCalledTimes(1);
  });

  it('returns undefined for 204', async () => {
    vi.stubGlobal('fetch', vi.fn(async () => new Response(null, { status: 204 })));
    await expect(api.delete('/api/tokens/1')).resolves.toBeUndefined();
  });
});

describe('fieldErrorsFromDetails', () => {
  it('reads `issues` with string or array paths and keeps the first message per field', () => {
    expect(
      fieldErrorsFromDetails({
        issues: [
          { path: 'profile.pixelCount', message: 'first' },
          { path: ['profile', 'pixelCount'], message: 'second' },
          { path: ['name'], message: 'name must not be empty' },
        ],
      }),
    ).toEqual({ 'profile.pixelCount': 'first', name: 'name must not be empty' });
  });

  it('reads zod flatten() output and ignores anything else', () => {
    expect(fieldErrorsFromDetails({ fieldErrors: { email: ['email must be an e-mail address'] } })).toEqual({
      email: 'email must be an e-mail address',
    });
    expect(fieldErrorsFromDetails(undefined)).toEqual({});
    expect(fieldErrorsFromDetails('nope')).toEqual({});
  });
});
