/**
 * The live board's event streams, one hub per app (created in createApp, never module state).
 *
 * A change at a site (a confirmation, a reassignment…) marks the site's board stale; after a short
 * debounce ONE snapshot is built and its serialised frame is written to every open stream of that
 * site. A burst of changes (a tablet's queue flushing after a Wi-Fi drop) becomes one build; a change
 * during a build schedules one more build after it. A stream that opens while a fresh frame exists
 * gets that frame without a build. Each person may hold a few streams open (tabs, a wall screen);
 * beyond that the stream is refused with 429 before it starts.
 */
import type { Knex } from 'knex';
import type { Logger } from 'pino';
import { AppError } from '../http/errors';
import { boardSnapshot } from './board.service';

/** A board change waits this long for more changes before the one shared snapshot is built. */
export const DEBOUNCE_MS = 250;
/** Open board streams per person: a wall screen, a laptop and a few tabs. */
export const MAX_STREAMS_PER_USER = 5;
/** SSE comment line this often, so proxies and the browser keep an idle stream open. */
export const HEARTBEAT_MS = 20_000;

/** What a stream writes to: the HTTP response (`res.write`). */
export interface StreamSink {
  write(chunk: string): unknown;
}

interface SiteStreams {
  siteId: number;
  sinks: Set<StreamSink>;
  /** The last built frame while no change has come since its build started; null when stale. */
  frame: string | null;
  /** Raised by every change; a build keeps its frame only if no change came while it ran. */
  version: number;
  timer: ReturnType<typeof setTimeout> | null;
  building: boolean;
  again: boolean;
}

export interface BoardStreamsOptions {
  /** Builds the site's board (board.service boardSnapshot). */
  snapshot(siteId: number): Promise<unknown>;
  logger: Pick<Logger, 'warn'>;
  debounceMs?: number;
  maxPerUser?: number;
  heartbeatMs?: number;
}

export class BoardStreams {
  private readonly sites = new Map<number, SiteStreams>();
  private readonly perUser = new Map<number, number>();
  private beat: ReturnType<typeof setInterval> | null = null;
  private readonly debounceMs: number;
  readonly maxPerUser: number;
  private readonly heartbeatMs: number;
  /** Snapshots built so far (all sites): one per change burst, however many streams are open. */
  builds = 0;

  constructor(private readonly options: BoardStreamsOptions) {
    this.debounceMs = options.debounceMs ?? DEBOUNCE_MS;
    this.maxPerUser = options.maxPerUser ?? MAX_STREAMS_PER_USER;
    this.heartbeatMs = options.heartbeatMs ?? HEARTBEAT_MS;
  }

  /** Streams open now: at a site, or in all. */
  openCount(siteId?: number): number {
    if (siteId !== undefined) return this.sites.get(siteId)?.sinks.size ?? 0;
    let n = 0;
    for (const s of this.sites.values()) n += s.sinks.size;
    return n;
  }

  /** Throws 429 when this person already holds the most streams; call before starting the response. */
  checkCap(userId: number): void {
    const held = this.perUser.get(userId) ?? 0;
    if (held >= this.maxPerUser) {
      throw new AppError(
        'rate_limited',
        'too_many_board_streams',
        `You already have ${held} live boards open (the most one person may keep open is ${this.maxPerUser}). Close a board tab or window, then reload this one.`,
        { open: held, max: this.maxPerUser },
      );
    }
  }

  /**
   * Adds a stream: it gets the current frame (built now if none is fresh) and every later one.
   * Returns the function that removes it (call it when the connection closes).
   */
  open(siteId: number, userId: number, sink: StreamSink): () => void {
    this.checkCap(userId);
    this.perUser.set(userId, (this.perUser.get(userId) ?? 0) + 1);
    let site = this.sites.get(siteId);
    if (!site) {
      site = { siteId, sinks: new Set(), frame: null, version: 0, timer: null, building: false, again: false };
      this.sites.set(siteId, site);
    }
    site.sinks.add(sink);
    if (site.frame !== null) sink.write(site.frame);
    else if (!site.building) void this.build(site);
    this.startHeartbeat();
    let closed = false;
    return () => {
      if (closed) return;
      closed = true;
      const held = (this.perUser.get(userId) ?? 1) - 1;
      if (held > 0) this.perUser.set(userId, held);
      else this.perUser.delete(userId);
      const s = this.sites.get(siteId);
      if (!s) return;
      s.sinks.delete(sink);
      if (s.sinks.size === 0 && !s.building) this.forget(s);
      if (this.sites.size === 0) this.stopHeartbeat();
    };
  }

  /** Something on the site's board changed (after its commit). Nobody watching: nothing to do. */
  siteChanged(siteId: number): void {
    const site = this.sites.get(siteId);
    if (!site) return;
    site.version += 1;
    site.frame = null;
    if (site.timer) return;
    site.timer = setTimeout(() => {
      site.timer = null;
      void this.build(site);
    }, this.debounceMs);
  }

  /** Ends every timer (tests; shutdown). Open responses are left to the HTTP server. */
  close(): void {
    for (const s of this.sites.values()) if (s.timer) clearTimeout(s.timer);
    this.sites.clear();
    this.perUser.clear();
    this.stopHeartbeat();
  }

  private async build(site: SiteStreams): Promise<void> {
    if (site.building) {
      site.again = true;
      return;
    }
    site.building = true;
    const version = site.version;
    try {
      const snap = await this.options.snapshot(site.siteId);
      this.builds += 1;
      const frame = `event: board\ndata: ${JSON.stringify(snap)}\n\n`;
      if (site.version === version) site.frame = frame;
      for (const sink of site.sinks) sink.write(frame);
    } catch (err) {
      this.options.logger.warn({ err, siteId: site.siteId }, 'board snapshot failed');
      // The board must not keep saying "Live" over a snapshot it could not build.
      const frame = `event: board-error\ndata: ${JSON.stringify({ message: 'The server could not build the board' })}\n\n`;
      for (const sink of site.sinks) sink.write(frame);
    } finally {
      site.building = false;
      if (site.sinks.size === 0) this.forget(site);
      else if (site.again) {
        site.again = false;
        void this.build(site);
      }
    }
  }

  private forget(site: SiteStreams): void {
    if (site.timer) clearTimeout(site.timer);
    if (this.sites.get(site.siteId) === site) this.sites.delete(site.siteId);
  }

  private startHeartbeat(): void {
    if (this.beat) return;
    this.beat = setInterval(() => {
      for (const s of this.sites.values()) for (const sink of s.sinks) sink.write(': ping\n\n');
    }, this.heartbeatMs);
    this.beat.unref?.();
  }

  private stopHeartbeat(): void {
    if (this.beat) clearInterval(this.beat);
    this.beat = null;
  }
}

/** The app's hub over its database: main.ts and the test helpers put it in Deps. */
export function createBoardStreams(
  db: Knex,
  logger: Pick<Logger, 'warn'>,
  options: Partial<Omit<BoardStreamsOptions, 'snapshot' | 'logger'>> = {},
): BoardStreams {
  return new BoardStreams({ snapshot: (siteId) => boardSnapshot(db, siteId), logger, ...options });
}
