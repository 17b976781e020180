/**
 * The event hub: publish/subscribe by topic, for signals that streams (live board, build jobs) wait on.
 * With SQLite there is one process, so the hub is in-process. With PostgreSQL several instances share
 * the data, so a publish also goes out as a `NOTIFY` on one channel (through pg-listen) and every
 * instance's subscribers hear it, typically within a few milliseconds.
 *
 * Each app has its own hub (`deps.events`, built in main.ts or a test helper); nothing here is held at
 * module level.
 */
import { randomUUID } from 'node:crypto';
import createPostgresSubscriber, { type Subscriber } from 'pg-listen';

export type Payload = string | number | boolean | null | { [k: string]: Payload } | Payload[];
export type Handler = (payload: Payload) => void;

export interface EventHub {
  /** Delivers to this instance's subscribers at once and, on PostgreSQL, to every other instance. */
  publish(topic: string, payload?: Payload): void;
  subscribe(topic: string, handler: Handler): () => void;
  /** True when a publish reaches other instances too. */
  readonly shared: boolean;
  close(): Promise<void>;
}

/** The PostgreSQL channel every instance listens on. */
export const NOTIFY_CHANNEL = 'aislewright_events';

class LocalHub implements EventHub {
  readonly shared: boolean = false;
  private readonly topics = new Map<string, Set<Handler>>();

  publish(topic: string, payload: Payload = null): void {
    this.deliver(topic, payload);
  }

  protected deliver(topic: string, payload: Payload): void {
    for (const h of [...(this.topics.get(topic) ?? [])]) {
      try {
        h(payload);
      } catch {
        // A subscriber's failure is its own; the others still hear the event.
      }
    }
  }

  subscribe(topic: string, handler: Handler): () => void {
    const set = this.topics.get(topic) ?? new Set<Handler>();
    set.add(handler);
    this.topics.set(topic, set);
    return () => {
      set.delete(handler);
      if (set.size === 0) this.topics.delete(topic);
    };
  }

  async close(): Promise<void> {
    this.topics.clear();
  }
}

interface Wire {
  origin: string;
  topic: string;
  payload: Payload;
}

/** In-process delivery plus LISTEN/NOTIFY between instances. */
class PgHub extends LocalHub {
  override readonly shared = true;
  private readonly origin = randomUUID();

  constructor(
    private readonly subscriber: Subscriber,
    private readonly onError: (err: Error) => void,
  ) {
    super();
    subscriber.notifications.on(NOTIFY_CHANNEL, (w: Wire) => {
      // Our own publishes were delivered locally already.
      if (w && w.origin !== this.origin) this.deliver(w.topic, w.payload);
    });
    subscriber.events.on('error', (err) => onError(err));
  }

  override publish(topic: string, payload: Payload = null): void {
    this.deliver(topic, payload);
    const wire: Wire = { origin: this.origin, topic, payload };
    // NOTIFY payloads are capped at 8000 bytes: send topics and small payloads, never snapshots.
    this.subscriber.notify(NOTIFY_CHANNEL, wire).catch((err: Error) => this.onError(err));
  }

  override async close(): Promise<void> {
    await super.close();
    await this.subscriber.close();
  }
}

export function createLocalHub(): EventHub {
  return new LocalHub();
}

/** Connects to PostgreSQL and listens; reconnects by itself (pg-listen) after a dropped connection. */
export async function createPgHub(url: string, onError: (err: Error) => void = () => undefined): Promise<EventHub> {
  const subscriber = createPostgresSubscriber({ connectionString: url }, { retryLimit: Infinity, retryTimeout: Infinity });
  await subscriber.connect();
  await subscriber.listenTo(NOTIFY_CHANNEL);
  return new PgHub(subscriber, onError);
}
