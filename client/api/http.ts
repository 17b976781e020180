import type { z } from 'zod';
import { CSRF_HEADER, CSRF_VALUE, ErrorBody, FieldIssue } from '@shared/common';

/** Anything the server (or the network) answered with instead of the expected body. */
export class ApiError extends Error {
  readonly code: string;
  readonly status: number;
  readonly details: unknown;

  constructor(code: string, message: string, status: number, details?: unknown) {
    super(message);
    this.name = 'ApiError';
    this.code = code;
    this.status = status;
    this.details = details;
  }

  /** Validation details as `[{ field, message }]`; empty when the server sent none. */
  get fieldIssues(): FieldIssue[] {
    const parsed = FieldIssue.array().safeParse(this.details);
    return parsed.success ? parsed.data : [];
  }
}

export type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
const UNSAFE: ReadonlySet<Method> = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

export interface RequestOptions {
  body?: unknown;
  /**
   * Set for calls where "not signed in" is an ordinary answer (reading who is signed in at start),
   * so a 401 there does not send the user to the sign-in page.
   */
  quietUnauthenticated?: boolean;
}

export interface HttpDeps {
  fetch: typeof globalThis.fetch;
  /** Called when any call finds the session gone (401 `unauthenticated`). */
  onUnauthenticated: () => void;
}

export type Http = <S extends z.ZodType>(method: Method, path: string, schema: S, options?: RequestOptions) => Promise<z.infer<S>>;

async function readJson(response: Response): Promise<unknown> {
  const text = await response.text();
  if (text === '') return undefined;
  try {
    return JSON.parse(text) as unknown;
  } catch {
    return undefined;
  }
}

/** A typed fetch: CSRF header on unsafe methods, same-origin cookies, every body parsed with its schema. */
export function createHttp(deps: HttpDeps): Http {
  return async (method, path, schema, options = {}) => {
    const headers: Record<string, string> = { accept: 'application/json' };
    if (UNSAFE.has(method)) headers[CSRF_HEADER] = CSRF_VALUE;
    const init: RequestInit = { method, headers, credentials: 'same-origin' };
    if (options.body !== undefined) {
      headers['content-type'] = 'application/json';
      init.body = JSON.stringify(options.body);
    }

    let response: Response;
    try {
      response = await deps.fetch(path, init);
    } catch {
      throw new ApiError('network', 'The server could not be reached. Check the connection and try again.', 0);
    }

    const json = await readJson(response);
    if (!response.ok) {
      const body = ErrorBody.safeParse(json);
      const error = body.success
        ? new ApiError(body.data.error.code, body.data.error.message, response.status, body.data.error.details)
        : new ApiError('http_error', `The server answered ${response.status} ${response.statusText}`.trim(), response.status);
      if (response.status === 401 && error.code === 'unauthenticated' && !options.quietUnauthenticated) {
        deps.onUnauthenticated();
      }
      throw error;
    }

    const parsed = schema.safeParse(json);
    if (!parsed.success) {
      throw new ApiError('bad_response', `Unexpected answer from ${method} ${path}.`, response.status, parsed.error.issues);
    }
    return parsed.data;
  };
}

let unauthenticatedHandler: () => void = () => {};

/** main.ts points this at the router once it exists; the http module stays free of router imports. */
export function setUnauthenticatedHandler(handler: () => void): void {
  unauthenticatedHandler = handler;
}

export const http: Http = createHttp({
  fetch: (input, init) => globalThis.fetch(input, init),
  onUnauthenticated: () => unauthenticatedHandler(),
});
