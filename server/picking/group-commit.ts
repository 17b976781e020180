/**
 * Group commit for picker writes. Each confirmation must be on disk (synchronous=FULL) before its
 * answer, and better-sqlite3 waits for that fsync on the event loop; at 50+ confirmations a second
 * one fsync each would stall every other request. Writes that arrive while a commit is under way
 * are run together in the next transaction, each in its own savepoint (one failing leaves the others
 * untouched), and all are answered after that one commit. Alone, a write commits at once, as before.
 */
import type { Knex } from 'knex';
import { isPg } from '../db/dialect';

interface Unit {
  work: (trx: Knex.Transaction) => Promise<unknown>;
  resolve: (value: unknown) => void;
  reject: (reason: unknown) => void;
}

/** Most writes in one commit: keeps a batch's hold on the connection short. */
export const MAX_GROUP = 64;

export class GroupCommit {
  private queue: Unit[] = [];
  private running = false;
  /** Writes per commit so far, for the load test's report. */
  readonly sizes: number[] = [];

  constructor(private readonly db: Knex) {}

  run<T>(work: (trx: Knex.Transaction) => Promise<T>): Promise<T> {
    return new Promise<T>((resolve, reject) => {
      this.queue.push({ work, resolve: resolve as (v: unknown) => void, reject });
      if (!this.running) void this.drain();
    });
  }

  private async drain(): Promise<void> {
    this.running = true;
    try {
      while (this.queue.length > 0) {
        const batch = this.queue.splice(0, MAX_GROUP);
        const outcomes: ({ ok: true; value: unknown } | { ok: false; error: unknown })[] = [];
        try {
          await this.db.transaction(async (trx) => {
            for (const unit of batch) {
              try {
                outcomes.push({ ok: true, value: await trx.transaction((sp) => unit.work(sp)) });
              } catch (error) {
                outcomes.push({ ok: false, error });
              }
            }
          });
        } catch (error) {
          // The commit itself failed: nothing of this batch is on disk, so nobody hears "done".
          for (const unit of batch) unit.reject(error);
          continue;
        }
        if (this.sizes.length < 100_000) this.sizes.push(batch.length);
        batch.forEach((unit, i) => {
          const o = outcomes[i]!;
          if (o.ok) unit.resolve(o.value);
          else unit.reject(o.error);
        });
      }
    } finally {
      this.running = false;
    }
  }
}

/** A write's own transaction, the way PostgreSQL takes concurrent writes. */
export interface Committer {
  run<T>(work: (trx: Knex.Transaction) => Promise<T>): Promise<T>;
}

const committers = new WeakMap<Knex, GroupCommit>();

/** One transaction per write on the pool's connections; PostgreSQL groups concurrent WAL flushes itself. */
const ownTransaction = (db: Knex): Committer => ({ run: (work) => db.transaction(work) });

/**
 * The committer of a database handle: on SQLite its one group committer; on PostgreSQL each write in a
 * transaction of its own — funnelling every write through one connection there would queue them behind
 * one another's round trips, and the server already shares one flush among commits arriving together.
 */
export function groupCommit(db: Knex): Committer {
  if (isPg(db)) return ownTransaction(db);
  let g = committers.get(db);
  if (!g) {
    g = new GroupCommit(db);
    committers.set(db, g);
  }
  return g;
}
