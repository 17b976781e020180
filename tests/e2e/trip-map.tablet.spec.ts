import { expect, test, type Locator, type Page } from '@playwright/test';
import { releaseTripTo } from './harness/waves';
import { supervisorApi } from './harness/session';

/**
 * Issue 16, picker: the trip map's "Full screen" chip sits in a column of its own beside the drawing,
 * so it covers no aisle or route, and the offline banner never covers the map — on a landscape
 * 1024 × 768 tablet and a portrait 800 × 1280 one. A tap anywhere on the map still opens it full screen.
 */
type Box = { x: number; y: number; width: number; height: number };
const overlaps = (a: Box, b: Box): boolean => a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;

async function box(l: Locator): Promise<Box> {
  const b = await l.boundingBox();
  expect(b).not.toBeNull();
  return b!;
}

async function signInAndOpenTrip(page: Page): Promise<void> {
  await page.goto('/sign-in/badge');
  await page.locator('#badge').fill('P-1002');
  await page.keyboard.press('Enter');
  for (const d of '246810') await page.keyboard.press(d);
  await page.keyboard.press('Enter');
  await page.waitForURL('**/pick');
  const understand = page.getByRole('button', { name: 'I understand' });
  await expect(understand.or(page.getByTestId('current-bin'))).toBeVisible();
  if (await understand.isVisible()) {
    await understand.click();
    await expect(page.getByTestId('cart-setup')).toBeVisible();
    while ((await page.getByTestId('tote-ready').count()) > 0) await page.getByTestId('tote-ready').first().click();
  }
  await expect(page.getByTestId('current-bin')).toBeVisible();
}

test('the Full screen chip covers no part of the trip map, and the offline banner never covers the map', async ({ browser, baseURL }) => {
  const api = await supervisorApi(baseURL!);
  const released = await releaseTripTo(api, { orders: 3, pickerName: 'Robin Picker', keyPrefix: 'trip-map', waveName: 'Trip map wave', longestBy: 'stops' });

  for (const viewport of [
    { width: 1024, height: 768 },
    { width: 800, height: 1280 },
  ]) {
    const context = await browser.newContext({ viewport, hasTouch: true });
    const page = await context.newPage();
    await signInAndOpenTrip(page);
    const canvas = page.getByTestId('map-canvas');
    await expect(canvas.locator('canvas').first()).toBeVisible();
    const chip = await box(page.locator('.map-open-chip'));
    const drawing = await box(canvas);
    const frame = await box(page.getByTestId('trip-map'));
    // The chip is inside the map's frame, right of the drawing, and a finger-sized target.
    expect(overlaps(chip, drawing)).toBe(false);
    expect(chip.x).toBeGreaterThanOrEqual(drawing.x + drawing.width);
    expect(chip.x + chip.width).toBeLessThanOrEqual(frame.x + frame.width);
    expect(chip.height).toBeGreaterThanOrEqual(56);
    expect(drawing.width).toBeGreaterThanOrEqual(200);

    await context.setOffline(true);
    await expect(page.getByTestId('queue-banner')).toContainText('offline');
    const banner = await box(page.getByTestId('queue-banner'));
    expect(overlaps(banner, await box(page.getByTestId('trip-map')))).toBe(false);
    expect((await box(page.getByTestId('trip-map'))).height).toBeGreaterThanOrEqual(140);
    await page.screenshot({ path: `test-results/trip-map-offline-${viewport.width}x${viewport.height}.png` });

    // A tap on the drawing itself (not the chip) opens the map full screen; the banner moved it down.
    const moved = await box(canvas);
    expect(overlaps(banner, moved)).toBe(false);
    await page.mouse.click(moved.x + moved.width / 2, moved.y + moved.height / 2);
    await expect(page.getByTestId('map-full')).toBeVisible();
    expect(overlaps(await box(page.getByTestId('map-full-status')), await box(page.getByTestId('map-full-body')))).toBe(false);
    await page.getByTestId('map-close').click();
    await expect(page.getByTestId('map-full')).toHaveCount(0);
    await context.setOffline(false);
    await context.close();
  }

  // Leave Robin free for the browser tests after this one (they share one server).
  expect((await api.post(`/api/sites/${released.siteId}/board/waves/${released.waveId}/close`, { data: { reason: 'browser test done' } })).status()).toBe(200);
});
