import { describe, expect, it, vi } from 'vitest';
import { z } from 'zod';
import { ApiError, createHttp, errorFromAnswer, parseJsonText } from '@client/api/http';
import { sendAction } from '@client/api/picking';
import { Me } from '@shared/auth';
import { Ok } from '@shared/common';

const me = { id: 1, name: 'Avery', email: 'a@example.test', role: 'admin', badge: null, sites: [], sessionEndsAt: '2026-01-01T10:00:00Z' };

function setup(status: number, body: unknown) {
  const fetch = vi.fn(
    async (_input: RequestInfo | URL, _init?: RequestInit) =>
      new Response(body === undefined ? '' : JSON.stringify(body), { status, headers: { 'content-type': 'application/json' } }),
  );
  const onUnauthenticated = vi.fn();
  return { fetch, onUnauthenticated, http: createHttp({ fetch, onUnauthenticated }) };
}

function headersOf(init: RequestInit | undefined): Record<string, string> {
  return (init?.headers ?? {}) as Record<string, string>;
}

describe('http', () => {
  it('adds the CSRF header and a JSON body on unsafe methods, with same-origin cookies', async () => {
    for (const method of ['POST', 'PUT', 'PATCH', 'DELETE'] as const) {
      const { fetch, http } = setup(200, { ok: true });
      await http(method, '/api/x', Ok, { body: { a: 1 } });
      const init = fetch.mock.calls[0]?.[1];
      expect(headersOf(init)['x-aislewright'], method).toBe('1');
      expect(headersOf(init)['content-type']).toBe('application/json');
      expect(init?.body).toBe('{"a":1}');
      expect(init?.credentials).toBe('same-origin');
    }
  });

  it('leaves the CSRF header off GET', async () => {
    const { fetch, http } = setup(200, me);
    await http('GET', '/api/auth/me', Me);
    expect(headersOf(fetch.mock.calls[0]?.[1])['x-aislewright']).toBeUndefined();
  });

  it('returns the body parsed by the shared schema', async () => {
    const { http } = setup(200, me);
    await expect(http('GET', '/api/auth/me', Me)).resolves.toEqual(me);
  });

  it('throws bad_response when the body does not match the schema', async () => {
    const { http } = setup(200, { ...me, role: 'overlord' });
    await expect(http('GET', '/api/auth/me', Me)).rejects.toMatchObject({ code: 'bad_response', status: 200 });
  });

  it('turns the error body into an ApiError with code, message, details and status', async () => {
    const details = [{ field: 'email', message: 'Invalid email address' }];
    const { http } = setup(400, { error: { code: 'validation_failed', message: 'Check the highlighted fields.', details } });
    const error = await http('POST', '/api/auth/sign-in', Me, { body: {} }).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiError);
    expect(error).toMatchObject({ code: 'validation_failed', message: 'Check the highlighted fields.', status: 400, details });
    expect((error as ApiError).fieldIssues).toEqual(details);
  });

  it('still throws an ApiError when the error body is not ours', async () => {
    const { http } = setup(502, undefined);
    await expect(http('GET', '/api/x', z.unknown())).rejects.toMatchObject({ code: 'http_error', status: 502 });
  });

  it('reports a network failure as code network, status 0', async () => {
    const fetch = vi.fn(async () => {
      throw new TypeError('Failed to fetch');
    });
    const http = createHttp({ fetch, onUnauthenticated: vi.fn() });
    await expect(http('GET', '/api/x', z.unknown())).rejects.toMatchObject({ code: 'network', status: 0 });
  });

  it('calls the session-expired handler on 401 unauthenticated, and still throws', async () => {
    const { http, onUnauthenticated } = setup(401, { error: { code: 'unauthenticated', message: 'Sign in first.' } });
    await expect(http('GET', '/api/users', z.unknown())).rejects.toMatchObject({ code: 'unauthenticated', status: 401 });
    expect(onUnauthenticated).toHaveBeenCalledTimes(1);
  });

  it('does not treat wrong credentials as an expired session', async () => {
    const { http, onUnauthenticated } = setup(401, { error: { code: 'invalid_credentials', message: 'E-mail or password is wrong.' } });
    await expect(http('POST', '/api/auth/sign-in', Me, { body: {} })).rejects.toMatchObject({ code: 'invalid_credentials' });
    expect(onUnauthenticated).not.toHaveBeenCalled();
  });

  it('stays quiet on 401 for calls that expect it (who is signed in, at start)', async () => {
    const { http, onUnauthenticated } = setup(401, { error: { code: 'unauthenticated', message: 'Sign in first.' } });
    await expect(http('GET', '/api/auth/me', Me, { quietUnauthenticated: true })).rejects.toBeInstanceOf(ApiError);
    expect(onUnauthenticated).not.toHaveBeenCalled();
  });
});

describe('errorFromAnswer (the one decoder behind createHttp, uploads and the picker queue)', () => {
  it("reads the server's error body: code, message, details and status", () => {
    const e = errorFromAnswer(409, 'Conflict', { error: { code: 'trip_closed', message: 'Trip 4 was cancelled.', details: { tripId: 4 } } });
    expect(e).toBeInstanceOf(ApiError);
    expect([e.code, e.message, e.status, e.details]).toEqual(['trip_closed', 'Trip 4 was cancelled.', 409, { tripId: 4 }]);
  });

  it('names the status when something in front of the server answered (an HTML page, no body)', () => {
    const e = errorFromAnswer(502, 'Bad Gateway', parseJsonText('<html>proxy</html>'));
    expect([e.code, e.message, e.status]).toEqual(['http_error', 'The server answered 502 Bad Gateway', 502]);
    expect(errorFromAnswer(500, '', undefined).message).toBe('The server answered 500');
  });

  it('gives the picker queue the same error as createHttp for the same answer', async () => {
    const answer = () =>
      new Response(JSON.stringify({ error: { code: 'line_not_shown', message: 'Not the line on screen' } }), { status: 409, statusText: 'Conflict' });
    const viaHttp = await createHttp({ fetch: async () => answer(), onUnauthenticated: () => {} })('POST', '/x', z.object({})).catch(
      (e: unknown) => e as ApiError,
    );
    const viaQueue = await sendAction({ kind: 'undo', tripId: 1, lineId: 2, body: {} }, 'key-123456789', 'tablet-1', async () => answer());
    expect(viaQueue.ok).toBe(false);
    const queued = (viaQueue as { ok: false; error: ApiError }).error;
    expect([queued.code, queued.message, queued.status]).toEqual([viaHttp.code, viaHttp.message, viaHttp.status]);
  });
});
