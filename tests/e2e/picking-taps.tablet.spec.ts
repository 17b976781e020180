/**
 * Issue 10, items 4 and 5 on a tablet viewport: two taps on Confirm 120 ms apart confirm exactly one
 * line; the Undo button reopens it (audited); after "Skip for now" the tablet still shows the printed
 * stop number, and the skipped stop comes back with it.
 */
import { expect, test, type APIRequestContext } from '@playwright/test';
import { supervisorApi } from './harness/session';
import { badgeSignIn, dbRows, linesDone, openTrip, suiteDbFile } from './harness/tablet';
import { releaseTripTo, type ReleasedTrip } from './harness/waves';

const PICKER = { badge: 'P-1001', name: 'Pat Picker' };

/** Releases a wave of six open orders and gives its longest trip (by stops) to the picker. */
async function releaseTrip(api: APIRequestContext): Promise<ReleasedTrip> {
  const trip = await releaseTripTo(api, { orders: 6, pickerName: PICKER.name, keyPrefix: 'taps', waveName: `Tap test wave ${Date.now()}`, longestBy: 'stops' });
  expect(trip.stops, 'the trip needs stops to skip and come back to').toBeGreaterThanOrEqual(3);
  return trip;
}

test('a double tap confirms one line, Undo reopens it, and a skipped stop keeps its printed number', async ({ page, baseURL }) => {
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  const api = await supervisorApi(baseURL!);
  const { tripId, lines } = await releaseTrip(api);
  await badgeSignIn(page, PICKER.badge);
  await openTrip(page);

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
  const picked = dbRows<{ id: number }>(suiteDbFile(baseURL!), "SELECT id FROM pick_lines WHERE trip_id = ? AND status = 'picked'", tripId);
  expect(picked).toHaveLength(1);

  // Undo, within a few seconds: the line is open again, on the tablet and on the server, with an audit entry.
  await expect(page.getByTestId('undo-bar')).toBeVisible();
  await page.screenshot({ path: 'test-results/shots/trip-safety-undo-1024.png' });
  await page.getByTestId('undo').click();
  await expect(page.getByTestId('progress')).toContainText(linesDone(0, lines));
  await expect(page.getByTestId('queue-banner')).toBeHidden({ timeout: 15_000 });
  await expect.poll(() => dbRows(suiteDbFile(baseURL!), "SELECT id FROM pick_lines WHERE trip_id = ? AND status = 'picked'", tripId).length).toBe(0);
  expect(dbRows(suiteDbFile(baseURL!), "SELECT id FROM audit_log WHERE action = 'pick.undo' AND subject = ?", `line:${picked[0]!.id}`)).toHaveLength(1);

  // Skip the first stop: the next card shows its own printed number; the skipped one keeps its number.
  const stopTitle = page.getByTestId('stop-number');
  const printed = (await stopTitle.textContent())!.match(/Stop (\d+) of (\d+)/)!;
  const skippedN = printed[1]!;
  const total = printed[2]!;
  await page.getByTestId('skip').click();
  await expect(stopTitle).not.toHaveText(`Stop ${skippedN} of ${total}`);
  await expect(page.getByTestId('stop-list').locator('li', { hasText: 'Skipped, later' }).locator('.n')).toHaveText(skippedN);
  await expect(page.getByTestId('queue-banner')).toBeHidden({ timeout: 15_000 });
  const stopNs = dbRows<{ n: number }>(suiteDbFile(baseURL!), 'SELECT n FROM stops WHERE trip_id = ? ORDER BY n', tripId).map((r) => r.n);
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
