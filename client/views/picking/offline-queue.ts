/**
 * The tablet's queue of picker writes, kept in IndexedDB so a Wi-Fi drop, a reload or a flat
 * battery loses nothing. Each write gets its idempotency key when queued and keeps it for every
 * resend, so the server records it once however often it is sent.
 */
import { createStore, get, set, type UseStore } from 'idb-keyval';
import { newId } from '@client/utils/ids';
import type { ApiError } from '@client/api/http';
import type { PickAction, SendOutcome } from '@client/api/picking';

export interface QueuedAction {
  key: string;
  action: PickAction;
  queuedAt: string;
}

export type Sender = (action: PickAction, key: string) => Promise<SendOutcome>;

export interface QueueEvents {
  /** The server took the write (or had it already): its answer. */
  answered(item: QueuedAction, answer: Extract<SendOutcome, { ok: true }>['answer']): void;
  /** The server refused the write for good (conflict, trip closed, not yours); it leaves the queue. */
  refused(item: QueuedAction, error: ApiError): void;
  /** Reachability as the last send found it. */
  reachability(online: boolean): void;
}

const ITEMS = 'items';

/** 32 hex digits from the platform's CSPRNG (see client/utils/ids.ts: no crypto.randomUUID on LAN HTTP). */
export const newIdempotencyKey = (): string => newId();

/** Network failures and server trouble (5xx, 429) are worth retrying; any other answer is final. */
export function isRetryable(error: ApiError): boolean {
  return error.status === 0 || error.status >= 500 || error.status === 429 || error.code === 'unauthenticated';
}

export class PickQueue {
  private items: QueuedAction[] = [];
  private flushing: Promise<void> | null = null;
  private readonly store: UseStore;

  constructor(
    private readonly send: Sender,
    private readonly events: QueueEvents,
    store?: UseStore,
  ) {
    this.store = store ?? createStore('aislewright-picking', 'queue');
  }

  get pending(): readonly QueuedAction[] {
    return this.items;
  }

  async load(): Promise<readonly QueuedAction[]> {
    this.items = (await get<QueuedAction[]>(ITEMS, this.store)) ?? [];
    return this.items;
  }

  /** Stores the write first, then tries to send; returns once it is safely on the device. */
  async enqueue(action: PickAction): Promise<QueuedAction> {
    const item: QueuedAction = { key: newIdempotencyKey(), action, queuedAt: new Date().toISOString() };
    this.items = [...this.items, item];
    await set(ITEMS, this.items, this.store);
    void this.flush();
    return item;
  }

  /** Sends queued writes in order; stops at the first one that cannot get through. */
  flush(): Promise<void> {
    this.flushing ??= this.drain().finally(() => {
      this.flushing = null;
    });
    return this.flushing;
  }

  private async drain(): Promise<void> {
    while (this.items.length > 0) {
      const item = this.items[0]!;
      const outcome = await this.send(item.action, item.key);
      if (!outcome.ok && isRetryable(outcome.error)) {
        this.events.reachability(outcome.error.status !== 0);
        return;
      }
      this.events.reachability(true);
      // The write leaves the queue and its answer is handed over in the same tick: a screen reading
      // the queue between the two would show the line open again. A crash before the store is
      // written only resends it under the same key, which the server answers from its record.
      this.items = this.items.filter((i) => i.key !== item.key);
      try {
        if (outcome.ok) this.events.answered(item, outcome.answer);
        else this.events.refused(item, outcome.error);
      } finally {
        await set(ITEMS, this.items, this.store);
      }
    }
  }
}
