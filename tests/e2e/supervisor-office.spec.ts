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
