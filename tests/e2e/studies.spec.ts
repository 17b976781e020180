import { readFileSync } from 'node:fs';
import { expect, test } from '@playwright/test';
import * as XLSX from 'xlsx';

const ENGINEER = { email: 'engineer@demo.aislewright.test', password: 'demo-password-1' };

test('an engineer runs a generated study, reads the table and both charts, compares two routes and exports the workbook', async ({ page }) => {
  test.setTimeout(240_000);
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(ENGINEER.email);
  await page.getByLabel('Password').fill(ENGINEER.password);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page).toHaveURL('/studies');

  await page.getByRole('button', { name: 'New study' }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'New study' })).toBeVisible();
  await page.getByTestId('study-name').locator('input').fill('Browser test study');
  // A small scenario on the active demo plan keeps the run short on a shared machine.
  await page.getByTestId('orders-waves').locator('input').fill('1');
  await page.getByTestId('orders-per-wave').locator('input').fill('16');
  await page.getByTestId('orders-per-wave').locator('input').blur();
  await page.getByRole('button', { name: 'Run study' }).click();
  await expect(page).toHaveURL(/\/studies\/\d+$/);

  const table = page.getByTestId('routing-table');
  await expect(table).toBeVisible({ timeout: 180_000 });
  const sShapeRow = table.getByRole('row').filter({ hasText: 'S-shape (traversal)' });
  await expect(sShapeRow).toContainText(/\d m/);
  await expect(table.getByRole('row').filter({ hasText: 'default' })).toContainText(/\d m/);
  await expect(page.getByTestId('study-answer')).toContainText('switching from S-shape to the default method saves');

  // Both charts draw on canvases.
  await expect(page.getByTestId('chart-total').locator('canvas')).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId('chart-stops').locator('canvas')).toBeVisible();

  // A chart saved as PNG through echarts' own renderer.
  const [png] = await Promise.all([page.waitForEvent('download'), page.getByTestId('png-total').click()]);
  expect(png.suggestedFilename()).toMatch(/total-distance\.png$/);
  expect(readFileSync(await png.path()).subarray(0, 8)).toEqual(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]));

  // Two routes of the same trip side by side, each with its metres, on two maps.
  const routes = page.getByTestId('routes-side-by-side');
  await routes.scrollIntoViewIfNeeded();
  await expect(page.getByTestId('route-left')).toContainText('S-shape (traversal)');
  await expect(page.getByTestId('route-left')).toContainText(/\d m/);
  await expect(page.getByTestId('route-right')).toContainText('2-opt/Or-opt');
  await expect(page.getByTestId('route-right')).toContainText(/\d m/);
  await expect(routes.locator('canvas').first()).toBeVisible();
  // Each map draws on its own Konva stage (a plan layer and a route layer).
  expect(await routes.locator('canvas').count()).toBeGreaterThanOrEqual(4);

  // The workbook holds the figure the table shows for S-shape.
  const shown = (await sShapeRow.locator('td').nth(1).innerText()).trim();
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-workbook').click()]);
  const file = await download.path();
  const wb = XLSX.read(readFileSync(file), { type: 'buffer' });
  expect(wb.SheetNames[0]).toBe('inputs');
  const rows = XLSX.utils.sheet_to_json<(string | number)[]>(wb.Sheets.routing!, { header: 1 });
  const sShape = rows.find((r) => r[0] === 's-shape')!;
  expect(`${Number(sShape[2]).toLocaleString('en-US', { minimumFractionDigits: 1, maximumFractionDigits: 1 })} m`).toBe(shown);
});
