/**
 * The app opened under a LAN-style host name over plain HTTP (issue 10, item 9): no secure context,
 * so no crypto.randomUUID, no service workers, no wake lock. Chromium maps the made-up name
 * floor.test to the loopback address (`--host-resolver-rules`), which makes the page an ordinary
 * insecure origin, unlike http://localhost (a secure context by the W3C Secure Contexts rules).
 * A supervisor builds and releases a wave there, and a picker on a tablet viewport signs in and
 * confirms a pick.
 */
import { expect, test, type Page } from '@playwright/test';
import { CHROMIUM, CHROMIUM_ARGS, E2E_PORT as PORT } from './harness/chromium';
import { CSRF } from './harness/session';

const HOST = `http://floor.test:${PORT}`;

const PICKER = { badge: 'P-1002', pin: '246810', name: 'Robin Picker' };

test.use({
  baseURL: HOST,
  launchOptions: {
    executablePath: CHROMIUM,
    args: [...CHROMIUM_ARGS, '--host-resolver-rules=MAP floor.test 127.0.0.1'],
  },
});

/**
 * A call through the page's own fetch: Playwright's request context resolves names in Node, where
 * floor.test does not exist, while the page resolves it through Chromium's mapping.
 */
async function api<T>(page: Page, method: 'GET' | 'POST', path: string, body?: unknown): Promise<{ status: number; body: T }> {
  return page.evaluate(
    async ({ method, path, body, csrf }) => {
      const res = await fetch(path, {
        method,
        headers: { 'content-type': 'application/json', ...csrf },
        ...(body === undefined ? {} : { body: JSON.stringify(body) }),
      });
      return { status: res.status, body: await res.json() };
    },
    { method, path, body, csrf: CSRF },
  );
}

/** The guard that keeps this test honest: the page really is an insecure context without randomUUID. */
async function expectInsecureContext(page: Page): Promise<void> {
  expect(new URL(page.url()).host).toBe(`floor.test:${PORT}`);
  const ctx = await page.evaluate(() => ({
    secure: window.isSecureContext,
    randomUUID: typeof (crypto as { randomUUID?: unknown }).randomUUID,
    serviceWorker: 'serviceWorker' in navigator,
  }));
  expect(ctx).toEqual({ secure: false, randomUUID: 'undefined', serviceWorker: false });
}

test('on http://floor.test a supervisor plans and releases a wave, and a picker confirms a pick on the tablet', async ({ page, browser }) => {
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));

  await page.goto('/sign-in');
  await expectInsecureContext(page);
  await page.getByLabel('E-mail').fill('supervisor@demo.aislewright.test');
  await page.getByLabel('Password').fill('demo-password-1');
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page).toHaveURL(`${HOST}/waves`);

  await page.goto('/waves/new');
  await expect(page.getByRole('heading', { name: 'Build a wave' })).toBeVisible();
  // Ten demo orders (WEB-20150 … WEB-20159); other browser tests take the first open ones.
  await page.getByPlaceholder('Search reference').fill('WEB-2015');
  await expect(page.getByText(/^\d+ of \d+ open orders selected$/)).toHaveText(/^([1-9]\d*) of \1 open orders selected$/);
  // A planning request that never reaches the server ends in a visible error, not a spinner at 0 %.
  await page.route('**/wave-previews', (route) => route.abort('connectionrefused'), { times: 1 });
  await page.getByRole('button', { name: 'Plan preview' }).click();
  await expect(page.getByTestId('plan-error')).toContainText('The server could not be reached');
  await expect(page.getByRole('status').filter({ hasText: 'Planning' })).toHaveCount(0);
  await page.screenshot({ path: test.info().outputPath('plan-error.png') });
  await page.getByRole('button', { name: 'Plan preview' }).click();
  await expect(page.getByText('3 · Preview')).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId('plan-error')).toHaveCount(0);
  const waveName = `LAN wave ${Date.now()}`;
  await page.getByPlaceholder('Wave name (optional)').fill(waveName);
  await page.getByRole('button', { name: /Release \d+ trips?/ }).click();
  await expect(page).toHaveURL(/\/waves\/\d+$/);
  await expect(page.getByRole('heading', { name: waveName })).toBeVisible();

  // The supervisor gives the wave's first trip to the picker (same API the live board uses).
  const waveId = Number(/\/waves\/(\d+)$/.exec(page.url())![1]);
  // The demo site by its code: other tests add sites of their own.
  const siteId = (await api<{ id: number; code: string }[]>(page, 'GET', '/api/sites')).body.find((s) => s.code === 'BWE')!.id;
  const wave = (await api<{ tripList: { id: number; lines: number }[] }>(page, 'GET', `/api/sites/${siteId}/waves/${waveId}`)).body;
  const trip = wave.tripList[0]!;
  const board = (await api<{ pickers: { id: number; name: string }[] }>(page, 'GET', `/api/sites/${siteId}/board`)).body;
  const picker = board.pickers.find((p) => p.name === PICKER.name)!;
  const assigned = await api(page, 'POST', `/api/sites/${siteId}/board/trips/${trip.id}/assign`, { pickerId: picker.id });
  expect(assigned.status, JSON.stringify(assigned.body)).toBe(200);

  // The picker's tablet, on the same LAN address.
  const tablet = await browser.newContext({ baseURL: HOST, viewport: { width: 1024, height: 768 }, hasTouch: true, isMobile: true });
  const pick = await tablet.newPage();
  pick.on('pageerror', (e) => errors.push(`tablet: ${e.message}`));
  await pick.goto('/sign-in/badge');
  await expectInsecureContext(pick);
  await pick.locator('#badge').fill(PICKER.badge);
  await pick.keyboard.press('Enter');
  for (const d of PICKER.pin) await pick.keyboard.press(d);
  await pick.keyboard.press('Enter');
  await pick.waitForURL('**/pick');
  await expect(pick.getByRole('heading', { name: new RegExp(waveName) })).toBeVisible();
  await pick.getByRole('button', { name: 'I understand' }).click();
  // Cart set-up: every tote confirmed before the first stop.
  await expect(pick.getByTestId('tote-ready').first()).toBeVisible();
  while ((await pick.getByTestId('tote-ready').count()) > 0) await pick.getByTestId('tote-ready').first().tap();
  const bin = (await pick.getByTestId('current-bin').textContent())!.trim();
  await pick.getByTestId('confirm').tap();
  await expect(pick.getByTestId('progress')).toContainText(new RegExp(`(^|\\D)1 of ${trip.lines} lines`));
  await expect(pick.getByTestId('queue-banner')).toBeHidden({ timeout: 15_000 });
  await pick.screenshot({ path: test.info().outputPath('tablet-after-pick.png') });

  // The server holds the pick, made on the LAN address.
  const detail = (await api<{ stopList: { lines: { bin: string; status: string }[] }[] }>(page, 'GET', `/api/sites/${siteId}/trips/${trip.id}`)).body;
  expect(
    detail.stopList
      .flatMap((s) => s.lines)
      .filter((l) => l.status === 'picked')
      .map((l) => l.bin),
  ).toEqual([bin]);
  await tablet.close();
  expect(errors).toEqual([]);
  // Leave the demo picker free for the browser tests after this one (they share one server).
  const closed = await api(page, 'POST', `/api/sites/${siteId}/board/waves/${waveId}/close`, { reason: 'browser test done' });
  expect(closed.status, JSON.stringify(closed.body)).toBe(200);
});
