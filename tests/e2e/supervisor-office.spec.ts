import { expect, test } from '@playwright/test';

/**
 * A supervisor at 1366 × 800: an overdue order stands out in words, its order screen shows its lines,
 * an open order is cancelled (and leaves the open orders), and the SKU list filters bins missing from
 * the active plan.
 */
test('supervisor sees an overdue order, opens it, cancels it, and filters SKUs whose bin is off the plan', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('supervisor@demo.aislewright.test');
  await page.getByLabel('Password').fill('demo-password-1');
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page).toHaveURL('/waves');

  // One SKU whose bin the demo plan does not have, and an order that was due long ago.
  await page.goto('/orders');
  await page.getByRole('button', { name: 'Import SKUs or orders' }).click();
  const inputs = page.locator('input[type=file]');
  const skus = 'sku,description,bin,unit_weight_kg,unit_volume_l\nE2E-OFF,Off-plan test item,Z-99-99-9,1,1\nE2E-ON,On-plan test item,A-01-01-1,1,1\n';
  await inputs.nth(0).setInputFiles({ name: 'skus.csv', mimeType: 'text/csv', buffer: Buffer.from(skus) });
  await expect(page.getByText('SKUs imported')).toBeVisible();
  const orders = 'order,sku,qty,due,priority\nLATE-0001,E2E-ON,2,2020-01-02T08:00:00Z,1\n';
  await inputs.nth(1).setInputFiles({ name: 'orders.csv', mimeType: 'text/csv', buffer: Buffer.from(orders) });
  await expect(page.getByText('Orders imported')).toBeVisible();

  await page.getByPlaceholder('Search order reference').fill('LATE-0001');
  const row = page.getByRole('row', { name: /LATE-0001/ });
  await expect(row).toBeVisible();
  await expect(row.getByText(/Overdue/)).toBeVisible();

  await row.getByRole('link', { name: 'LATE-0001' }).click();
  await expect(page).toHaveURL(/\/orders\/\d+$/);
  await expect(page.getByRole('heading', { name: 'Order LATE-0001' })).toBeVisible();
  await expect(page.getByText(/Overdue by/)).toBeVisible();
  await expect(page.getByRole('cell', { name: 'E2E-ON' })).toBeVisible();
  await expect(page.getByText('Not in any wave yet.')).toBeVisible();
  await page.screenshot({ path: 'test-results/supervisor-order.png' });

  await page.getByRole('button', { name: 'Cancel order…' }).click();
  await page.getByLabel('Reason for cancelling').fill('Customer withdrew it');
  await page.getByRole('button', { name: 'Cancel the order' }).click();
  await expect(page.getByText('Order LATE-0001 cancelled')).toBeVisible();
  await expect(page.getByText(/^Cancelled · 1 line · 2 units$/)).toBeVisible();
  await expect(page.getByRole('button', { name: 'Cancel order…' })).toHaveCount(0);

  await page.getByRole('button', { name: 'All orders' }).click();
  await page.getByPlaceholder('Search order reference').fill('LATE-0001');
  await expect(page.getByText('No orders match.')).toBeVisible();

  await page.goto('/skus');
  await page.getByLabel('Search SKUs').fill('E2E-');
  await expect(page.getByRole('cell', { name: 'E2E-ON', exact: true })).toBeVisible();
  await page.getByText(/Only bins not on the active plan/).click();
  await expect(page.getByRole('cell', { name: 'E2E-OFF', exact: true })).toBeVisible();
  await expect(page.getByRole('cell', { name: 'E2E-ON', exact: true })).toHaveCount(0);
  await expect(page.getByText('⚠ No: bin not on the active plan')).toBeVisible();
});

/** Two pickers sign in on tablets; the supervisor sees them on the wave page and assigns them the waiting trips. */
test('supervisor sees who is signed in and assigns waiting trips to the free pickers', async ({ page, browser }) => {
  const tablets = [];
  for (const badge of ['P-1001', 'P-1002']) {
    const tablet = await browser.newContext();
    const r = await tablet.request.post('/api/auth/badge-sign-in', { headers: { 'x-aislewright': '1' }, data: { badge, pin: '246810' } });
    expect(r.status()).toBe(200);
    tablets.push(tablet);
  }

  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('supervisor@demo.aislewright.test');
  await page.getByLabel('Password').fill('demo-password-1');
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page).toHaveURL('/waves');

  // A wave of three one-order trips, released through the API (the builder has its own test).
  const me = await (await page.request.get('/api/auth/me')).json();
  const siteId = me.sites.find((s: { code: string }) => s.code === 'BWE').id;
  const open = await (await page.request.get(`/api/sites/${siteId}/orders?status=open&pageSize=3`)).json();
  const site = await (await page.request.get(`/api/sites/${siteId}`)).json();
  const job = await (
    await page.request.post(`/api/sites/${siteId}/wave-previews`, {
      headers: { 'x-aislewright': '1' },
      data: {
        orderIds: open.rows.map((o: { id: number }) => o.id),
        cartProfileId: site.cartProfiles[0].id,
        batching: 'single',
        method: 'best',
        improve: 'local',
      },
    })
  ).json();
  let state = job;
  for (let i = 0; i < 300 && state.state === 'running'; i++) {
    await page.waitForTimeout(200);
    state = await (await page.request.get(`/api/sites/${siteId}/wave-previews/${job.id}`)).json();
  }
  const released = await page.request.post(`/api/sites/${siteId}/waves`, {
    headers: { 'x-aislewright': '1' },
    data: { previewId: job.id, releaseKey: `e2e-${job.id}` },
  });
  expect(released.status()).toBe(201);
  const wave = await released.json();

  await page.goto(`/waves/${wave.id}`);
  const panel = page.getByTestId('signed-in-pickers');
  await expect(panel).toContainText('Pat Picker (free)');
  await expect(panel).toContainText('Robin Picker (free)');
  await page.getByRole('button', { name: /Assign waiting trips to free pickers \(3 trips, 2 free pickers\)/ }).click();
  await expect(page.getByText(/Assigned trip 1 to .+, trip 2 to /)).toBeVisible();
  await expect(panel).toContainText(/Pat Picker \(trip [12]\)/);
  await expect(panel).toContainText(/Robin Picker \(trip [12]\)/);
  await expect(page.getByRole('row', { name: /^3 / })).toContainText('Waiting for a picker');
  await page.screenshot({ path: 'test-results/supervisor-assign.png' });
  for (const tablet of tablets) await tablet.close();
  // Leave the demo pickers free for the browser tests after this one (they share one server).
  const closed = await page.request.post(`/api/sites/${siteId}/board/waves/${wave.id}/close`, {
    headers: { 'x-aislewright': '1' },
    data: { reason: 'browser test done' },
  });
  expect(closed.status(), await closed.text()).toBe(200);
});
