/**
 * The browser every browser test and the floor-map benchmark drive: Debian's Chromium (never a downloaded
 * browser: `apt-get install -y chromium`; README.md), headless, with no network of its own.
 */
export const CHROMIUM = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';

export const CHROMIUM_ARGS: readonly string[] = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

/** The port the suite's web server listens on (`E2E_PORT`); its database lives in `test-results/e2e-db-<port>`. */
export const E2E_PORT = Number(process.env.E2E_PORT ?? 3310);
