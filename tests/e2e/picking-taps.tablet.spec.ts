/**
 * Issue 10, items 4 and 5 on a tablet viewport: two taps on Confirm 120 ms apart confirm exactly one
 * line; the Undo button reopens it (audited); after "Skip for now" the tablet still shows the printed
 * stop number, and the skipped stop comes back with it.
 */
import Database from 'better-sqlite3';
import { expect, test, type APIRequestContext, type Page } from '@playwright/test';
import { supervisorApi } from './harness/session';

const PICKER = { badge: 'P-1001', pin: '246810', name: 'Pat Picker' };

/** Releases a wave of six open orders and gives its longest trip to the picker. */
async function releaseTrip(api: APIRequestContext): Promise<{ tripId: number; lines: number; stops: number }> {
  const sites = (await (await api.get('/api/sites')).json()) as { id: number; cartProfiles: { id: number }[] }[];
  const site = sites[0]!;
  const page = (await (await api.get(`/api/sites/${site.id}/orders?status=open&pageSize=6`)).json()) as { rows: { id: number }[] };
  const orderIds = page.rows.slice(0, 6).map((o) => o.id);
  let job = (await (
    await api.post(`/api/sites/${site.id}/wave-previews`, { data: { orderIds, cartProfileId: site.cartProfiles[0]!.id, batching: 'fcfs' } })
  ).json()) as { id: string; state: string };
  for (let i = 0; i < 300 && job.state === 'running'; i++) {
    await new Promise((r) => setTimeout(r, 200));
    job = (await (await api.get(`/api/sites/${site.id}/wave-previews/${job.id}`)).json()) as typeof job;
  }
  expect(job.state).toBe('done');
  const released = await api.post(`/api/sites/${site.id}/waves`, {
    data: { previewId: job.id, releaseKey: `taps-${job.id}`, name: `Tap test wave ${Date.now()}` },
  });
  expect(released.status()).toBe(201);
  const wave = (await released.json()) as { tripList: { id: number; lines: number; stops: number }[] };
  const trip = [...wave.tripList].sort((a, b) => b.stops - a.stops)[0]!;
  expect(trip.stops, 'the trip needs stops to skip and come back to').toBeGreaterThanOrEqual(3);
  const board = (await (await api.get(`/api/sites/${site.id}/board`)).json()) as { pickers: { id: number; name: string }[] };
  const picker = board.pickers.find((p) => p.name === PICKER.name)!;
  const assigned = await api.post(`/api/sites/${site.id}/board/trips/${trip.id}/assign`, { data: { pickerId: picker.id } });
  expect(assigned.status(), await assigned.text()).toBe(200);
  return { tripId: trip.id, lines: trip.lines, stops: trip.stops };
}

const linesDone = (done: number, lines: number): RegExp => new RegExp(`(^|\\D)${done} of ${lines} lines`);

function dbRows<T>(baseURL: string, sql: string, ...args: unknown[]): T[] {
  const db = new Database(`test-results/e2e-db-${new URL(baseURL).port}/aislewright.sqlite`, { readonly: true, fileMustExist: true });
  try {
    return db.prepare(sql).all(...args) as T[];
  } finally {
    db.close();
  }
}

async function signIn(page: Page): Promise<void> {
  await page.goto('/sign-in/badge');
  await page.locator('#badge').fill(PICKER.badge);
  await page.keyboard.press('Enter');
  for (const d of PICKER.pin) await page.keyboard.press(d);
  await page.keyboard.press('Enter');
  await page.waitForURL('**/pick');
  await page.getByRole('button', { name: 'I understand' }).click();
  // Cart set-up (issue 16): each tote confirmed with its "Tote N ready" button.
  await expect(page.getByTestId('cart-setup')).toBeVisible();
  while ((await page.getByTestId('tote-ready').count()) > 0) await page.getByTestId('tote-ready').first().click();
  await expect(page.getByTestId('current-bin')).toBeVisible();
}

test('a double tap confirms one line, Undo reopens it, and a skipped stop keeps its printed number', async ({ page, baseURL }) => {
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  const api = await supervisorApi(baseURL!);
  const { tripId, lines } = await releaseTrip(api);
  await signIn(page);

  // Two taps 120 ms apart, as a finger bouncing on the glass.
  const box = (await page.getByTestId('confirm').boundingBox())!;
  const x = box.x + box.width / 2;
  const y = box.y + box.height / 2;
  await page.mouse.click(x, y);
  await page.waitForTimeout(120);
  await page.mouse.click(x, y);
  await expect(page.getByTestId('progress')).toContainText(linesDone(1, lines));
  await expect(page.getByTestId('queue-banner')).toBeHidden({ timeout: 15_000 });
  await page.waitForTimeout(800);
  await expect(page.getByTestId('progress')).toContainText(linesDone(1, lines));
  const picked = dbRows<{ id: number }>(baseURL!, "SELECT id FROM pick_lines WHERE trip_id = ? AND status = 'picked'", tripId);
  expect(picked).toHaveLength(1);

  // Undo, within a few seconds: the line is open again, on the tablet and on the server, with an audit entry.
  await expect(page.getByTestId('undo-bar')).toBeVisible();
  await page.screenshot({ path: 'test-results/shots/trip-safety-undo-1024.png' });
  await page.getByTestId('undo').click();
  await expect(page.getByTestId('progress')).toContainText(linesDone(0, lines));
  await expect(page.getByTestId('queue-banner')).toBeHidden({ timeout: 15_000 });
  await expect.poll(() => dbRows(baseURL!, "SELECT id FROM pick_lines WHERE trip_id = ? AND status = 'picked'", tripId).length).toBe(0);
  expect(dbRows(baseURL!, "SELECT id FROM audit_log WHERE action = 'pick.undo' AND subject = ?", `line:${picked[0]!.id}`)).toHaveLength(1);

  // Skip the first stop: the next card shows its own printed number; the skipped one keeps its number.
  const stopTitle = page.getByTestId('stop-number');
  const printed = (await stopTitle.textContent())!.match(/Stop (\d+) of (\d+)/)!;
  const skippedN = printed[1]!;
  const total = printed[2]!;
  await page.getByTestId('skip').click();
  await expect(stopTitle).not.toHaveText(`Stop ${skippedN} of ${total}`);
  await expect(page.getByTestId('stop-list').locator('li', { hasText: 'Skipped, later' }).locator('.n')).toHaveText(skippedN);
  await expect(page.getByTestId('queue-banner')).toBeHidden({ timeout: 15_000 });
  const stopNs = dbRows<{ n: number }>(baseURL!, 'SELECT n FROM stops WHERE trip_id = ? ORDER BY n', tripId).map((r) => r.n);
  expect(stopNs).toEqual(Array.from({ length: Number(total) }, (_, i) => i + 1));

  // Pick every other stop (one tap at a time); the skipped stop comes back under its printed number.
  for (let guard = 0; guard < lines; guard++) {
    if ((await stopTitle.textContent())!.startsWith(`Stop ${skippedN} of`)) break;
    await page.getByTestId('confirm').click();
    await page.waitForTimeout(50);
  }
  await expect(stopTitle).toHaveText(`Stop ${skippedN} of ${total}`);
  await expect(page.getByTestId('skipped-tag')).toBeVisible();
  await page.screenshot({ path: 'test-results/shots/trip-safety-skipped-1024.png' });
  expect(errors).toEqual([]);
  await api.dispose();
});
