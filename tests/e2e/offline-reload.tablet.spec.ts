/**
 * Issue 16, picker: the app opens again after a reload with no network. The server runs under HTTPS
 * with a certificate made here by openssl (a throw-away CA signing a certificate for floor.test),
 * opened as https://floor.test:<port> — not localhost, so only HTTPS makes it a secure context. The
 * picker opens a trip, goes offline, reloads (the service worker's app shell opens), confirms a pick
 * (queued on the tablet), reconnects, and the server holds it exactly once. Also: the trip map goes
 * full screen and the offline banner never covers it; on plain HTTP from a LAN name the picker is
 * told that offline reload is unavailable.
 */
import { spawn, execFileSync, type ChildProcess } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, expect, request, test, type APIRequestContext, type Browser, type Locator } from '@playwright/test';
import { CHROMIUM, CHROMIUM_ARGS } from './harness/chromium';
import { supervisorApi } from './harness/session';
import { badgeSignIn, dbRows, linesDone, openTrip } from './harness/tablet';
import { releaseTripTo, type ReleasedTrip } from './harness/waves';

const HTTP_PORT = Number(process.env.E2E_PORT ?? 3310);
const HTTPS_PORT = Number(process.env.E2E_HTTPS_PORT ?? HTTP_PORT + 1);
const HOST = 'floor.test';

let dir = '';
let server: ChildProcess | null = null;
let browser: Browser | null = null;
const httpsBase = `https://${HOST}:${HTTPS_PORT}`;
const dbFile = () => join(dir, 'db', 'aislewright.sqlite');

/** A small CA and a server certificate for floor.test, localhost and 127.0.0.1, as the README tells a site to make. */
function makeCertificates(to: string): { cert: string; key: string } {
  const o = (...args: string[]) => execFileSync('openssl', args, { cwd: to, stdio: 'pipe' });
  o('req', '-x509', '-newkey', 'rsa:2048', '-nodes', '-days', '2', '-subj', '/CN=Aislewright test CA', '-keyout', 'ca.key', '-out', 'ca.crt');
  o('req', '-newkey', 'rsa:2048', '-nodes', '-subj', `/CN=${HOST}`, '-keyout', 'server.key', '-out', 'server.csr');
  writeFileSync(join(to, 'san.ext'), `subjectAltName=DNS:${HOST},DNS:localhost,IP:127.0.0.1\nextendedKeyUsage=serverAuth\n`);
  o('x509', '-req', '-in', 'server.csr', '-CA', 'ca.crt', '-CAkey', 'ca.key', '-CAcreateserial', '-days', '2', '-extfile', 'san.ext', '-out', 'server.crt');
  return { cert: join(to, 'server.crt'), key: join(to, 'server.key') };
}

test.beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'aw-https-'));
  mkdirSync(join(dir, 'db'));
  const { cert, key } = makeCertificates(dir);
  server = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
    env: {
      ...process.env,
      PORT: String(HTTPS_PORT),
      DATABASE_FILE: dbFile(),
      LOG_LEVEL: 'warn',
      TLS_CERT_FILE: cert,
      TLS_KEY_FILE: key,
      PUBLIC_URL: httpsBase,
    },
    stdio: ['ignore', 'ignore', 'inherit'],
  });
  const probe = await request.newContext({ ignoreHTTPSErrors: true });
  let up = false;
  for (let i = 0; i < 120 && !up; i++) {
    up = await probe.get(`https://localhost:${HTTPS_PORT}/api/health`).then(
      (r) => r.ok(),
      () => false,
    );
    if (!up) await new Promise((r) => setTimeout(r, 500));
  }
  await probe.dispose();
  expect(up, 'the HTTPS server answers /api/health').toBe(true);
  browser = await chromium.launch({
    executablePath: CHROMIUM,
    args: [...CHROMIUM_ARGS, '--ignore-certificate-errors', `--host-resolver-rules=MAP ${HOST} 127.0.0.1`],
  });
});

test.afterAll(async () => {
  await browser?.close();
  if (server && server.exitCode === null) {
    server.kill('SIGTERM');
    await new Promise((r) => server!.once('exit', r));
  }
  if (dir) rmSync(dir, { recursive: true, force: true });
});

/** Releases a wave of four open orders and gives its longest trip to the named picker. */
const releaseTrip = (api: APIRequestContext, pickerName: string): Promise<ReleasedTrip> =>
  releaseTripTo(api, { orders: 4, pickerName, keyPrefix: 'offline', waveName: `Offline reload wave ${Date.now()}`, longestBy: 'lines' });

const rows = <T>(sql: string, ...args: unknown[]): T[] => dbRows<T>(dbFile(), sql, ...args);

const overlaps = (a: { x: number; y: number; width: number; height: number }, b: { x: number; y: number; width: number; height: number }): boolean =>
  a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;

async function box(l: Locator) {
  const b = await l.boundingBox();
  expect(b).not.toBeNull();
  return b!;
}

test('under HTTPS a reload with no network opens the app shell; a pick confirmed then is stored once after reconnecting', async () => {
  const api = await supervisorApi(`https://localhost:${HTTPS_PORT}`, { ignoreHTTPSErrors: true });
  const { tripId, lines } = await releaseTrip(api, 'Pat Picker');
  const context = await browser!.newContext({ viewport: { width: 1024, height: 768 }, hasTouch: true });
  const page = await context.newPage();
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await badgeSignIn(page, 'P-1001', httpsBase);
  expect(await page.evaluate(() => isSecureContext)).toBe(true);
  await expect(page.getByTestId('no-offline-reload')).toHaveCount(0);
  await openTrip(page);
  // The service worker is installed (its precache complete) before the network goes.
  expect(await page.evaluate(async () => (await navigator.serviceWorker.ready).active?.scriptURL)).toMatch(/\/sw\.js$/);
  // One pick online, so the tablet's copy of the trip has a line done before the reload.
  await page.getByTestId('confirm').click();
  await expect(page.getByTestId('progress')).toContainText(linesDone(1, lines));
  await expect(page.getByTestId('queue-banner')).toBeHidden({ timeout: 15_000 });

  await context.setOffline(true);
  await page.reload();
  // The app shell opened from the service worker, with the trip as the tablet last held it.
  await expect(page.getByTestId('current-bin')).toBeVisible();
  await expect(page.getByTestId('progress')).toContainText(linesDone(1, lines));
  await expect(page.getByTestId('queue-banner')).toContainText('offline — 0 waiting');
  const bin = (await page.getByTestId('current-bin').textContent())!.trim();
  await page.waitForTimeout(600);
  await page.getByTestId('confirm').click();
  await expect(page.getByTestId('queue-banner')).toContainText('offline — 1 waiting');
  await expect(page.getByTestId('progress')).toContainText(linesDone(2, lines));
  // Nothing reached the server while offline.
  expect(rows("SELECT id FROM pick_lines WHERE trip_id = ? AND status = 'picked'", tripId)).toHaveLength(1);

  // The map keeps its place and size under the offline banner, and opens full screen.
  const banner = await box(page.getByTestId('queue-banner'));
  const small = await box(page.locator('.map'));
  expect(small.height).toBeGreaterThanOrEqual(140);
  expect(overlaps(banner, small)).toBe(false);
  await page.screenshot({ path: 'test-results/shots/screens-picker-offline-reloaded-1024x768.png' });
  await page.getByTestId('map-open').click();
  const full = await box(page.getByTestId('map-full-body'));
  const status = await box(page.getByTestId('map-full-status'));
  expect(full.height).toBeGreaterThanOrEqual(400);
  expect(full.width).toBeGreaterThanOrEqual(900);
  expect(overlaps(status, full)).toBe(false);
  await expect(page.getByTestId('map-full').getByText('Safety:')).toBeVisible();
  expect((await box(page.getByTestId('map-close'))).height).toBeGreaterThanOrEqual(72);
  await page.screenshot({ path: 'test-results/shots/screens-picker-offline-map-full-1024x768.png' });
  await page.getByTestId('map-close').click();
  await expect(page.getByTestId('map-full')).toHaveCount(0);
  await expect(page.getByTestId('current-bin')).not.toHaveText(bin);

  // Back online: the queued pick is sent and stored exactly once.
  await context.setOffline(false);
  await expect(page.getByTestId('queue-banner')).toBeHidden({ timeout: 15_000 });
  await expect.poll(() => rows("SELECT id FROM pick_lines WHERE trip_id = ? AND status = 'picked'", tripId).length).toBe(2);
  await page.waitForTimeout(1500);
  const picked = rows<{ id: number }>("SELECT id FROM pick_lines WHERE trip_id = ? AND status = 'picked'", tripId);
  expect(picked).toHaveLength(2);
  const audits = rows<{ subject: string; n: number }>(
    `SELECT subject, COUNT(*) AS n FROM audit_log WHERE action = 'pick.confirm' AND subject IN (${picked.map(() => '?').join(',')}) GROUP BY subject`,
    ...picked.map((r) => `line:${r.id}`),
  );
  expect(audits).toHaveLength(2);
  for (const a of audits) expect(a.n, a.subject).toBe(1);

  // The service worker kept no API answer in any cache.
  const cached = await page.evaluate(async () => {
    const urls: string[] = [];
    for (const name of await caches.keys()) for (const r of await (await caches.open(name)).keys()) urls.push(r.url);
    return urls;
  });
  expect(cached.length).toBeGreaterThan(10);
  expect(cached.filter((u) => new URL(u).pathname.startsWith('/api/'))).toEqual([]);
  // API answers say so themselves.
  expect((await api.get('/api/health')).headers()['cache-control']).toBe('no-store');
  expect(errors).toEqual([]);
  await context.close();
  await api.dispose();
});

test('on plain HTTP from a LAN name the picker is told offline reload is unavailable; on localhost they are not', async ({ baseURL }) => {
  const api = await supervisorApi(baseURL!);
  const { siteId, tripId } = await releaseTrip(api, 'Kai Picker');
  const context = await browser!.newContext({ viewport: { width: 800, height: 1280 }, hasTouch: true });
  const page = await context.newPage();
  await badgeSignIn(page, 'P-1003', `http://${HOST}:${HTTP_PORT}`);
  expect(await page.evaluate(() => isSecureContext)).toBe(false);
  await expect(page.getByTestId('no-offline-reload')).toContainText('Offline reload is unavailable');
  await page.screenshot({ path: 'test-results/shots/screens-picker-http-note-800x1280.png' });
  await openTrip(page);
  await context.setOffline(true);
  await page.getByTestId('confirm').click();
  await expect(page.getByTestId('queue-banner')).toContainText('offline reload is unavailable here');
  await context.setOffline(false);
  await expect(page.getByTestId('queue-banner')).toBeHidden({ timeout: 15_000 });
  await context.close();

  // The same screen on localhost (a secure context): no such note.
  const local = await browser!.newContext({ viewport: { width: 1024, height: 768 } });
  const lp = await local.newPage();
  await badgeSignIn(lp, 'P-1003', baseURL!);
  await expect(lp.getByTestId('current-bin')).toBeVisible();
  expect(await lp.evaluate(() => isSecureContext)).toBe(true);
  await expect(lp.getByTestId('no-offline-reload')).toHaveCount(0);
  await local.close();
  // The suite's server is shared with the other tablet tests: Kai is left free for them.
  const cancelled = await api.post(`/api/sites/${siteId}/board/trips/${tripId}/cancel`, { data: { reason: 'end of the offline-reload test' } });
  expect(cancelled.status(), await cancelled.text()).toBe(200);
  await api.dispose();
});
