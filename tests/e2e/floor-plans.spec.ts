import { expect, test, type Page } from '@playwright/test';

/** Demo sign-in seeded on an empty database (API-FOUNDATION.md). */
async function signInAsSupervisor(page: Page): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('supervisor@demo.aislewright.test');
  await page.getByLabel('Password').fill('demo-password-1');
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page).toHaveURL('/waves');
}

test('supervisor uploads the template, sees the draft on the map and activates it', async ({ page }) => {
  await signInAsSupervisor(page);
  await page.goto('/floor-plans');
  await expect(page.getByRole('heading', { level: 1, name: 'Floor plans' })).toBeVisible();

  // The template exactly as a user downloads it from the page.
  const href = await page.getByTestId('template-link').getAttribute('href');
  const template = await page.request.get(href!);
  expect(template.ok()).toBe(true);
  const bytes = await template.body();

  await page.getByTestId('plan-upload').locator('input[type=file]').setInputFiles({
    name: 'aislewright-floor-plan-template.xlsx',
    mimeType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
    buffer: bytes,
  });

  // A clean file becomes a draft and the plan page opens with its map.
  await expect(page).toHaveURL(/\/floor-plans\/\d+$/, { timeout: 60_000 });
  await expect(page.getByTestId('plan-state')).toHaveText(/Draft/);
  const map = page.getByTestId('plan-map');
  await expect(map.locator('canvas').first()).toBeVisible();
  const heading = page.getByRole('heading', { level: 1 });
  await expect(heading).toHaveText(/^v\d+ · aislewright-floor-plan-template$/);
  const version = /^v(\d+)/.exec((await heading.textContent()) ?? '')![1];

  await page.getByTestId('activate').click();
  await page.getByRole('button', { name: `Activate v${version}` }).click();
  await expect(page.getByTestId('plan-state')).toHaveText(/Active/);
  await expect(page.getByTestId('activate')).toHaveCount(0);

  // The plan that was active before (the demo plan) is now retired, shown in words.
  await page.getByRole('button', { name: 'All versions' }).click();
  const rows = page.getByTestId('plan-table').locator('tbody tr');
  await expect(rows.first()).toContainText(`v${version}`);
  await expect(rows.first()).toContainText('Active');
  await expect(rows.filter({ hasText: 'East hall (demo layout)' })).toContainText('Retired (read-only)');
});

test('a workbook with errors shows the error table and saves nothing', async ({ page }) => {
  await signInAsSupervisor(page);
  await page.goto('/floor-plans');
  const rows = page.getByTestId('plan-table').locator('tbody tr');
  await expect(rows.first()).toBeVisible();
  const before = await rows.count();
  await page.getByTestId('plan-upload').locator('input[type=file]').setInputFiles({
    name: 'broken.xlsx',
    mimeType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
    buffer: Buffer.from('not a workbook at all'),
  });
  await expect(page.getByTestId('error-table')).toBeVisible({ timeout: 60_000 });
  await expect(page.getByText(/nothing was saved/).first()).toBeVisible();
  await expect(page.getByTestId('errors-xlsx')).toHaveAttribute('href', /\/errors\?format=xlsx$/);
  await expect(rows).toHaveCount(before);
});
