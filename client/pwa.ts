/// <reference types="vite-plugin-pwa/client" />
/**
 * The installed app shell (vite-plugin-pwa): a service worker that keeps the built client on the
 * tablet, so a reload with no network still opens the app and its queued picks. Browsers run service
 * workers only in secure contexts (HTTPS, or localhost): on http://<lan-address> there is none, and
 * the picker screen says offline reload is unavailable.
 */

/** Whether this page can have the offline app shell at all. */
export const appShellPossible = (): boolean =>
  typeof navigator !== 'undefined' && 'serviceWorker' in navigator && typeof isSecureContext !== 'undefined' && isSecureContext;

/** Registers the service worker where the browser allows one; returns whether it tried. */
export function registerAppShell(): boolean {
  if (!('serviceWorker' in navigator) || !isSecureContext) return false;
  void import('virtual:pwa-register').then(({ registerSW }) => registerSW({ immediate: true })).catch(() => undefined);
  return true;
}
