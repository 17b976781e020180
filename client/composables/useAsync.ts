import { ref, shallowRef, type Ref, type ShallowRef } from 'vue';
import { ApiError } from '@client/api/http';

export type AsyncStatus = 'idle' | 'loading' | 'done' | 'error';

/** One sentence a person can act on, for any thrown value. */
export function describeError(error: unknown): string {
  if (error instanceof ApiError) {
    if (error.code === 'too_many_attempts') {
      const retry = (error.details as { retryAfterSeconds?: unknown } | undefined)?.retryAfterSeconds;
      return typeof retry === 'number' ? `${error.message} Try again in ${Math.ceil(retry)} s.` : error.message;
    }
    return error.message;
  }
  return error instanceof Error ? error.message : 'Something went wrong.';
}

export interface AsyncState<T, A extends unknown[]> {
  status: Ref<AsyncStatus>;
  data: ShallowRef<T | null>;
  error: ShallowRef<unknown>;
  /** Runs the call; a newer run wins over an older one still in flight. Resolves to null on error. */
  run: (...args: A) => Promise<T | null>;
  /** Runs the call again with the arguments of the last run (nothing before the first). */
  retry: () => Promise<T | null>;
}

/** What a loading, empty and error screen reads of a call (`BaseAsyncState`'s `source`). */
export interface AsyncSource {
  status: Ref<AsyncStatus>;
  error: Ref<unknown>;
  /** What "Try again" does when the screen is given nothing else. */
  retry?: () => unknown;
}

/** A call's explicit idle / loading / done / error state, for loading, empty and error screens. */
export function useAsync<T, A extends unknown[]>(fn: (...args: A) => Promise<T>): AsyncState<T, A> {
  const status = ref<AsyncStatus>('idle');
  const data = shallowRef<T | null>(null);
  const error = shallowRef<unknown>(null);
  let latest = 0;
  let lastArgs: A | null = null;

  async function run(...args: A): Promise<T | null> {
    const ticket = ++latest;
    lastArgs = args;
    status.value = 'loading';
    error.value = null;
    try {
      const result = await fn(...args);
      if (ticket === latest) {
        data.value = result;
        status.value = 'done';
      }
      return result;
    } catch (caught) {
      if (ticket === latest) {
        error.value = caught;
        status.value = 'error';
      }
      return null;
    }
  }

  const retry = (): Promise<T | null> => (lastArgs ? run(...lastArgs) : Promise.resolve(null));

  return { status, data, error, run, retry };
}
