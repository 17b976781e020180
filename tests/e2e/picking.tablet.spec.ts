/**
 * A whole trip on a tablet-sized browser: badge + PIN sign-in, take the trip, confirm every stop by
 * typed scans, one short, a network drop with two confirmations queued, back online, Return to
 * depot, summary. The server must then hold each confirmation exactly once, and the supervisor's
 * live board must show the trip done with one short.
 */
import Database from 'better-sqlite3';
import { expect, test, type APIRequestContext, type Page } from '@playwright/test';
import { supervisorApi } from './harness/session';
import { badgeSignIn, linesDone } from './harness/tablet';
import { releaseTripTo, type ReleasedTrip } from './harness/waves';

const PICKER = { badge: 'P-1003', name: 'Kai Picker' };

/** Releases a wave of four open orders (first come, first served) and gives its longest trip to the picker. */
async function releaseTrip(api: APIRequestContext): Promise<ReleasedTrip> {
  const trip = await releaseTripTo(api, {
    orders: 4,
    pickerName: PICKER.name,
    keyPrefix: 'tablet',
    waveName: `Tablet test wave ${Date.now()}`,
    longestBy: 'lines',
  });
  expect(trip.lines, 'the trip needs lines for a short, two offline confirmations and more').toBeGreaterThanOrEqual(5);
  return trip;
}

async function scan(page: Page, code: string): Promise<void> {
  const field = page.getByTestId('scan-field');
  // The field keeps the focus: a hardware scanner types into it and ends with Enter.
  await expect(field).toBeFocused();
  await page.keyboard.type(code);
  await page.keyboard.press('Enter');
}

test('a picker picks a whole trip through a network drop; nothing is lost or doubled and the board follows', async ({ page, context, baseURL, browser }) => {
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  const api = await supervisorApi(baseURL!);
  const { siteId, tripId, lines, waveName } = await releaseTrip(api);

  await badgeSignIn(page, PICKER.badge);

  // The trip assigned to the picker is the one they take (the supervisor assigned it above).
  await expect(page.getByRole('heading', { name: new RegExp(waveName) })).toBeVisible();
  // The safety caution is shown at trip start, before any work.
  await expect(page.getByRole('heading', { name: 'Safety first' })).toBeVisible();
  await page.getByRole('button', { name: 'I understand' }).click();

  // Cart set-up before the first stop (issue 16): which order goes in which tote, as on the pick list.
  await expect(page.getByTestId('cart-setup')).toBeVisible();
  const toteRows = page.locator('[data-testid^="tote-row-"]');
  const toteCount = await toteRows.count();
  expect(toteCount).toBeGreaterThanOrEqual(1);
  await expect(toteRows.first()).toContainText(/Tote \d+ = \S+/);
  expect((await page.getByTestId('tote-ready').first().boundingBox())!.height).toBeGreaterThanOrEqual(72);
  // A label that is no tote of this trip is refused and named; the first tote is confirmed by its label.
  await expect(page.getByTestId('tote-scan')).toBeFocused();
  await page.keyboard.type('T-99');
  await page.keyboard.press('Enter');
  await expect(page.getByTestId('tote-wrong')).toContainText('Scanned T-99: not a tote of this trip');
  const firstTote = Number((await toteRows.first().getAttribute('data-testid'))!.replace('tote-row-', ''));
  await page.keyboard.type(`T${firstTote}`);
  await page.keyboard.press('Enter');
  await expect(page.getByTestId(`tote-done-${firstTote}`)).toContainText('Ready (scanned)');
  await expect(page.getByTestId('tote-count')).toHaveText(`1 of ${toteCount} ${toteCount === 1 ? 'tote' : 'totes'} ready`);
  while ((await page.getByTestId('tote-ready').count()) > 0) await page.getByTestId('tote-ready').first().click();
  await expect(page.getByTestId('current-bin')).toBeVisible();
  // Stored on the server with its audit entry: a reload goes straight back to the stop.
  await page.reload();
  await expect(page.getByTestId('current-bin')).toBeVisible();
  await expect(page.getByTestId('cart-setup')).toHaveCount(0);
  {
    const cdb = new Database(`test-results/e2e-db-${new URL(baseURL!).port}/aislewright.sqlite`, { readonly: true, fileMustExist: true });
    try {
      expect((cdb.prepare('SELECT cart_ready_at FROM trips WHERE id = ?').get(tripId) as { cart_ready_at: string | null }).cart_ready_at).not.toBeNull();
      const entries = cdb.prepare("SELECT detail FROM audit_log WHERE action = 'trip.cart_ready' AND subject = ?").all(`trip:${tripId}`) as {
        detail: string;
      }[];
      expect(entries).toHaveLength(1);
      const totes = (JSON.parse(entries[0]!.detail) as { totes: { tote: number; via: string }[] }).totes;
      expect(totes).toHaveLength(toteCount);
      expect(totes.find((t) => t.tote === firstTote)?.via).toBe('scan');
    } finally {
      cdb.close();
    }
  }

  // Sizes from the product's picker rules: current pick 40–64 px bold, primary ≥ 72 px, others ≥ 56 px.
  const binFont = await page.getByTestId('current-bin').evaluate((el) => getComputedStyle(el));
  expect(Number.parseFloat(binFont.fontSize)).toBeGreaterThanOrEqual(40);
  expect(Number.parseFloat(binFont.fontSize)).toBeLessThanOrEqual(64);
  expect(Number(binFont.fontWeight)).toBeGreaterThanOrEqual(700);
  expect((await page.getByTestId('confirm').boundingBox())!.height).toBeGreaterThanOrEqual(72);
  for (const id of ['short', 'skip', 'scan-field']) expect((await page.getByTestId(id).boundingBox())!.height).toBeGreaterThanOrEqual(56);

  // A wrong scan names what was expected and what was scanned, and confirms nothing.
  const firstBin = (await page.getByTestId('current-bin').textContent())!.trim();
  await scan(page, 'NOT-A-BIN');
  await expect(page.getByTestId('wrong-scan')).toContainText(`Expected bin ${firstBin}`);
  await expect(page.getByTestId('wrong-scan')).toContainText('Scanned NOT-A-BIN');
  await expect(page.getByTestId('progress')).toContainText(linesDone(0, lines));

  let done = 0;
  const confirmByScan = async () => {
    const bin = (await page.getByTestId('current-bin').textContent())!.trim();
    await scan(page, bin);
    done += 1;
    // After the last line the stop card gives way to "Return to depot".
    if (done === lines) await expect(page.getByTestId('return-to-depot')).toBeVisible();
    else await expect(page.getByTestId('progress')).toContainText(linesDone(done, lines));
  };

  await confirmByScan();
  // One short: one found less than ordered, or none.
  const qty = Number(await page.getByTestId('current-qty').textContent());
  await page.getByTestId('short').click();
  if (qty > 1) await page.getByRole('button', { name: 'One more' }).click();
  await page.getByTestId('reason-empty_bin').click();
  await page.getByTestId('short-submit').click();
  done += 1;
  await expect(page.getByTestId('progress')).toContainText(linesDone(done, lines));
  await expect(page.getByTestId('progress')).toContainText('1 short');
  await expect(page.getByTestId('queue-banner')).toBeHidden();

  // Wi-Fi drops: two confirmations are kept on the tablet.
  await context.setOffline(true);
  await confirmByScan();
  await confirmByScan();
  await expect(page.getByTestId('queue-banner')).toContainText('offline — 2 waiting');
  await context.setOffline(false);
  await expect(page.getByTestId('queue-banner')).toBeHidden({ timeout: 15_000 });

  while (done < lines) await confirmByScan();
  await page.getByTestId('return-to-depot').click();
  const summary = page.getByTestId('trip-summary');
  await expect(summary).toBeVisible();
  await expect(page.getByTestId('summary-lines')).toHaveText(`${lines - 1} of ${lines} picked`);
  await expect(page.getByTestId('summary-shorts')).toHaveText('1 short');
  await expect(page.getByTestId('summary-metres')).toContainText(' m');
  await expect(page.getByTestId('summary-minutes')).toContainText('min');
  await expect(page.getByTestId('next-trip')).toBeVisible();

  // The server holds each confirmation exactly once (read straight from its database file).
  // The suite's server keeps its database per port (playwright.config.ts).
  const db = new Database(`test-results/e2e-db-${new URL(baseURL!).port}/aislewright.sqlite`, { readonly: true, fileMustExist: true });
  try {
    const rows = db.prepare('SELECT id, status FROM pick_lines WHERE trip_id = ?').all(tripId) as { id: number; status: string }[];
    expect(rows).toHaveLength(lines);
    expect(rows.filter((r) => r.status === 'picked')).toHaveLength(lines - 1);
    expect(rows.filter((r) => r.status === 'short')).toHaveLength(1);
    const audits = db
      .prepare(
        "SELECT subject, COUNT(*) AS n FROM audit_log WHERE action IN ('pick.confirm', 'pick.short') AND subject IN (" +
          rows.map(() => '?').join(',') +
          ') GROUP BY subject',
      )
      .all(...rows.map((r) => `line:${r.id}`)) as { subject: string; n: number }[];
    expect(audits).toHaveLength(lines);
    for (const a of audits) expect(a.n, a.subject).toBe(1);
    const trip = db.prepare('SELECT status FROM trips WHERE id = ?').get(tripId) as { status: string };
    expect(trip.status).toBe('done');
  } finally {
    db.close();
  }
  expect(errors).toEqual([]);

  // The supervisor's live board shows the trip done with one short.
  const office = await browser.newContext({ viewport: { width: 1366, height: 900 } });
  const board = await office.newPage();
  await board.goto('/sign-in');
  await board.locator('#sign-in-email').fill('supervisor@demo.aislewright.test');
  await board.locator('#sign-in-password').fill('demo-password-1');
  await board.keyboard.press('Enter');
  await board.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
  await board.goto('/live');
  await expect(board.getByTestId('board-link')).toContainText('Live');
  await expect(board.getByText(waveName, { exact: true })).toBeVisible();
  await expect(board.getByTestId(`trip-status-${tripId}`)).toHaveText('Done');
  await expect(board.getByTestId(`trip-shorts-${tripId}`)).toHaveText('1');
  await office.close();
  await api.dispose();
  expect(siteId).toBeGreaterThan(0);
});
