import { expect, test } from '@playwright/test';

/**
 * A supervisor goes from order files to a released, printed wave: imports the SKU master and the
 * orders (the downloadable templates), builds a wave of those orders, sees the trips on the map,
 * releases it and opens the printable pick list.
 */
test('supervisor imports SKUs and orders, builds a wave, releases it and prints a pick list', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('supervisor@demo.aislewright.test');
  await page.getByLabel('Password').fill('demo-password-1');
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page).toHaveURL('/waves');

  const skus = await (await page.request.get('/api/templates/skus.xlsx')).body();
  const orders = await (await page.request.get('/api/templates/orders.xlsx')).body();
  const xlsx = 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet';

  await page.goto('/orders');
  await page.getByRole('button', { name: 'Import SKUs or orders' }).click();
  const inputs = page.locator('input[type=file]');
  await inputs.nth(0).setInputFiles({ name: 'skus.xlsx', mimeType: xlsx, buffer: skus });
  await expect(page.getByText('SKUs imported')).toBeVisible();
  await inputs.nth(1).setInputFiles({ name: 'orders.xlsx', mimeType: xlsx, buffer: orders });
  await expect(page.getByText('Orders imported')).toBeVisible();
  await expect(page.getByText(/2 new/)).toBeVisible();
  await page.getByPlaceholder('Search order reference').fill('WEB-1000');
  await expect(page.getByRole('cell', { name: 'WEB-10001' })).toBeVisible();

  await page.getByRole('link', { name: 'Build a wave' }).click();
  await expect(page).toHaveURL('/waves/new');
  await page.getByPlaceholder('Search reference').fill('WEB-1000');
  await expect(page.getByText('2 of 2 open orders selected')).toBeVisible();
  await page.getByRole('button', { name: 'Plan preview' }).click();
  await expect(page.getByText('3 · Preview')).toBeVisible({ timeout: 30_000 });
  await expect(page.getByText('Trip 1 on the floor map')).toBeVisible();
  await expect(page.locator('canvas').first()).toBeVisible();
  await page.getByRole('button', { name: /Release \d+ trips?/ }).click();
  await expect(page).toHaveURL(/\/waves\/\d+$/);
  await expect(page.getByRole('cell', { name: /WEB-10001/ })).toBeVisible();

  const [print] = await Promise.all([page.waitForEvent('popup'), page.getByRole('link', { name: 'Print pick list' }).first().click()]);
  await expect(print.getByRole('heading', { name: /Trip 1/ })).toBeVisible();
  await expect(print.getByText('A-01-01-1')).toBeVisible();
  await expect(print.getByRole('img', { name: 'Barcode A-01-01-1' })).toBeVisible();
  await expect(print.getByText(/forklift traffic rules/)).toBeVisible();
});
