/**
 * The change signal from the picking and board services to the app's live-board streams.
 *
 * Services call `siteChanged(siteId)` after each commit. The signal reaches the streams of the app
 * that is serving the request: createApp runs every request inside `withSiteEvents(hub, …)`, so two
 * apps in one process (tests, benchmarks) never see each other's changes, and a service called
 * outside any app (the command line, a seed) signals nobody. No runtime state lives in this module.
 */
import { AsyncLocalStorage } from 'node:async_hooks';

/** Hub topic of a site's change between instances (payload: the site id). */
export const SITE_CHANGED = 'site-changed';

export interface SiteChangeSink {
  siteChanged(siteId: number): void;
}

const current = new AsyncLocalStorage<SiteChangeSink>();

/** Runs `fn` (and everything it starts) with `sink` receiving the site changes it signals. */
export function withSiteEvents<T>(sink: SiteChangeSink, fn: () => T): T {
  return current.run(sink, fn);
}

export function siteChanged(siteId: number): void {
  current.getStore()?.siteChanged(siteId);
}
