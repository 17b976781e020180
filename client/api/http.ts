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

/** A body's JSON, or undefined when it is empty or not JSON (a proxy's HTML error page). */
export function parseJsonText(text: string): unknown {
  if (text === '') return undefined;
  try {
    return JSON.parse(text) as unknown;
  } catch {
    return undefined;
  }
}

async function readJson(response: Response): Promise<unknown> {
  return parseJsonText(await response.text());
}

/** The error for a request that never got an answer (no network, server down). */
export const networkError = (): ApiError => new ApiError('network', 'The server could not be reached. Check the connection and try again.', 0);

/**
 * The one decoder of an error answer, for fetch and XMLHttpRequest alike: the server's
 * `{ error: { code, message, details? } }`, or, from anything else in front of it, the status.
 */
export function errorFromAnswer(status: number, statusText: string, json: unknown): ApiError {
  const body = ErrorBody.safeParse(json);
  return body.success
    ? new ApiError(body.data.error.code, body.data.error.message, status, body.data.error.details)
    : new ApiError('http_error', `The server answered ${status} ${statusText}`.trim(), status);
}

/** A 2xx answer the schema refuses: the client and server disagree on the contract. */
export const badResponse = (method: Method, path: string, status: number, issues: unknown): ApiError =>
  new ApiError('bad_response', `Unexpected answer from ${method} ${path}.`, status, issues);

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
      throw networkError();
    }

    const json = await readJson(response);
    if (!response.ok) {
      const error = errorFromAnswer(response.status, response.statusText, json);
      if (response.status === 401 && error.code === 'unauthenticated' && !options.quietUnauthenticated) {
        deps.onUnauthenticated();
      }
      throw error;
    }

    const parsed = schema.safeParse(json);
    if (!parsed.success) {
      throw badResponse(method, path, response.status, parsed.error.issues);
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
