import { readFile } from 'node:fs/promises';
import { expect, request, test } from '@playwright/test';
import { CSRF, signInPage, supervisorApi } from './harness/session';
import { releaseTripTo } from './harness/waves';

/**
 * Issue 16, shorts: on the live board a supervisor re-picks one short in a later wave and sends another
 * to the replenishment list; both leave the attention list and show their follow-up. The re-pick order
 * names its original order and the wave builder offers it; the replenishment list downloads as CSV and
 * an entry is marked restocked.
 */
test('a supervisor re-picks one short later, sends another to the replenishment list, and works that list', async ({ page, baseURL }) => {
  const api = await supervisorApi(baseURL!);
  const released = await releaseTripTo(api, {
    orders: 4,
    pickerName: 'Robin Picker',
    keyPrefix: 'shorts',
    waveName: 'Shorts follow-up wave',
    longestBy: 'stops',
  });
  const site = { id: released.siteId };
  const wave = { id: released.waveId };
  const trip = { id: released.tripId, stops: released.stops };
  expect(trip.stops).toBeGreaterThanOrEqual(2);

  // Robin reports the first line of the first two stops short, nothing found (through the API: the tablet has its own tests).
  const tablet = await request.newContext({ baseURL, extraHTTPHeaders: CSRF });
  expect((await tablet.post('/api/auth/badge-sign-in', { data: { badge: 'P-1002', pin: '246810' } })).status()).toBe(200);
  expect((await tablet.post(`/api/picking/trips/${trip.id}/start`, { data: {} })).status()).toBe(200);
  const pickTrip = (await (await tablet.get(`/api/picking/trips/${trip.id}`)).json()) as {
    stopList: { lines: { id: number; sku: string; bin: string; qty: number; orderRef: string }[] }[];
  };
  const [first, second] = [pickTrip.stopList[0]!.lines[0]!, pickTrip.stopList[1]!.lines[0]!];
  for (const [k, line] of [first, second].entries()) {
    const res = await tablet.post(`/api/picking/trips/${trip.id}/lines/${line.id}/short`, {
      headers: { 'idempotency-key': `e2e-short-${trip.id}-${k}` },
      data: { qtyFound: 0, reason: 'empty_bin', pickedAt: new Date(Date.now() - (2 - k) * 5_000).toISOString() },
    });
    expect(res.status(), await res.text()).toBe(200);
  }

  await signInPage(page, 'supervisor@demo.aislewright.test', '/waves');
  await page.goto('/live');
  const attention = page.getByTestId('board-shorts');
  await expect(attention.getByRole('row')).toHaveCount(3);
  const firstRow = attention.getByRole('row', { name: new RegExp(first.bin) });
  await firstRow.getByRole('button', { name: 'Re-pick later' }).click();
  await expect(page.getByText(`A new open order (${first.orderRef}-R1`)).toBeVisible();
  await page.getByRole('button', { name: 'Make the re-pick order' }).click();
  const repickRef = `${first.orderRef}-R1`;
  await expect(page.getByText(`Order ${repickRef} is open for a later wave`)).toBeVisible();

  await attention
    .getByRole('row', { name: new RegExp(second.bin) })
    .getByRole('button', { name: 'To replenishment' })
    .click();
  await expect(page.getByText(`Bin ${second.bin} is on the replenishment list`)).toBeVisible();
  // Both left the attention list; the follow-ups are shown for the shift.
  await expect(page.getByTestId('board-shorts')).toHaveCount(0);
  const handled = page.getByTestId('board-handled-shorts');
  await expect(handled.getByRole('row', { name: new RegExp(first.bin) })).toContainText(`Re-pick: order ${repickRef}`);
  await expect(handled.getByRole('row', { name: new RegExp(second.bin) })).toContainText('On the replenishment list');
  await page.screenshot({ path: 'test-results/short-follow-ups-board.png' });

  // The re-pick order names the order it came from and carries the short line.
  await handled.getByRole('link', { name: repickRef }).click();
  await expect(page.getByRole('heading', { name: `Order ${repickRef}` })).toBeVisible();
  await expect(page.getByTestId('repick-of')).toContainText(first.orderRef);
  await expect(page.getByRole('cell', { name: first.sku, exact: true })).toBeVisible();
  await expect(page.getByText(/^Open · 1 line · /)).toBeVisible();

  // The wave builder offers it like any open order.
  await page.goto('/waves/new');
  await page.getByLabel('Search reference').fill(repickRef);
  await expect(page.getByRole('row', { name: new RegExp(repickRef) })).toBeVisible();

  // The replenishment list: the bin, downloadable, then restocked.
  await page.goto('/replenishment');
  const row = page.getByRole('row', { name: new RegExp(second.bin) });
  await expect(row).toContainText(second.sku);
  await expect(row).toContainText(second.orderRef);
  await expect(row).toContainText('Robin Picker');
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('replenishment-csv').click()]);
  expect(download.suggestedFilename()).toMatch(/^replenishment-.*\.csv$/);
  const csv = await readFile((await download.path())!, 'utf8');
  expect(csv).toContain(`${second.sku},`);
  expect(csv).toContain(`,${second.bin},${second.qty},empty_bin,`);
  await page.screenshot({ path: 'test-results/short-follow-ups-replenishment.png' });
  await row.getByRole('button', { name: 'Restocked' }).click();
  await expect(page.getByText(`Bin ${second.bin} marked restocked`)).toBeVisible();
  await expect(page.getByRole('row', { name: new RegExp(second.bin) })).toHaveCount(0);
  await page.getByText('Show restocked bins too').click();
  await expect(page.getByRole('row', { name: new RegExp(second.bin) })).toContainText('✓ Restocked by Sam Supervisor');

  // Leave Robin free for the browser tests after this one (they share one server).
  expect((await api.post(`/api/sites/${site.id}/board/waves/${wave.id}/close`, { data: { reason: 'browser test done' } })).status()).toBe(200);
  await tablet.dispose();
});
