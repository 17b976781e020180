import { expect, request, test, type Page } from '@playwright/test';

/** Demo sign-in seeded on an empty database (README.md, demo sign-ins). */
async function signInAsSupervisor(page: Page): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('supervisor@demo.aislewright.test');
  await page.getByLabel('Password').fill('demo-password-1');
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page).toHaveURL('/waves');
}

/**
 * A site of its own for this test, so activating the template does not retire the demo plan the other
 * browser tests pick on. An admin creates it and adds the supervisor; the page then switches to it.
 */
async function useFreshSite(page: Page, baseURL: string): Promise<void> {
  const admin = await request.newContext({ baseURL, extraHTTPHeaders: { 'x-aislewright': '1' } });
  expect((await admin.post('/api/auth/sign-in', { data: { email: 'admin@demo.aislewright.test', password: 'demo-password-1' } })).status()).toBe(200);
  const code = `FP${Date.now() % 100000}`;
  const site = (await (await admin.post('/api/sites', { data: { code, name: `Floor-plan test hall ${code}` } })).json()) as { id: number };
  const users = (await (await admin.get('/api/users')).json()) as { id: number; email: string | null; siteIds: number[] }[];
  const sup = users.find((u) => u.email === 'supervisor@demo.aislewright.test')!;
  expect((await admin.patch(`/api/users/${sup.id}`, { data: { siteIds: [...sup.siteIds, site.id] } })).status()).toBe(200);
  await admin.dispose();
  await page.evaluate((id) => localStorage.setItem('aislewright.siteId', String(id)), site.id);
}

async function uploadTemplate(page: Page): Promise<string> {
  await page.goto('/floor-plans');
  await expect(page.getByRole('heading', { level: 1, name: 'Floor plans' })).toBeVisible();
  // The template exactly as a user downloads it from the page.
  const href = await page.getByTestId('template-link').getAttribute('href');
  const template = await page.request.get(href!);
  expect(template.ok()).toBe(true);
  await page
    .getByTestId('plan-upload')
    .locator('input[type=file]')
    .setInputFiles({
      name: 'aislewright-floor-plan-template.xlsx',
      mimeType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
      buffer: await template.body(),
    });
  // A clean file becomes a draft and the plan page opens with its map.
  await expect(page).toHaveURL(/\/floor-plans\/\d+$/, { timeout: 60_000 });
  await expect(page.getByTestId('plan-state')).toHaveText(/Draft/);
  await expect(page.getByTestId('plan-map').locator('canvas').first()).toBeVisible();
  const heading = page.getByRole('heading', { level: 1 });
  await expect(heading).toHaveText(/^v\d+ · aislewright-floor-plan-template$/);
  const version = /^v(\d+)/.exec((await heading.textContent()) ?? '')![1]!;
  await page.getByTestId('activate').click();
  await page.getByRole('button', { name: `Activate v${version}` }).click();
  await expect(page.getByTestId('plan-state')).toHaveText(/Active/);
  await expect(page.getByTestId('activate')).toHaveCount(0);
  return version;
}

test('supervisor uploads the template, sees the draft on the map and activates it', async ({ page, baseURL }) => {
  await signInAsSupervisor(page);
  await useFreshSite(page, baseURL!);
  const first = await uploadTemplate(page);
  const second = await uploadTemplate(page);

  // The plan that was active before is now retired, shown in words.
  await page.getByRole('button', { name: 'All versions' }).click();
  const rows = page.getByTestId('plan-table').locator('tbody tr');
  await expect(rows.first()).toContainText(`v${second}`);
  await expect(rows.first()).toContainText('Active');
  await expect(rows.filter({ hasText: `v${first}` })).toContainText('Retired (read-only)');
});

test('the demo plan is untouched by the test above', async ({ page }) => {
  await signInAsSupervisor(page);
  await page.goto('/floor-plans');
  const rows = page.getByTestId('plan-table').locator('tbody tr');
  await expect(rows.filter({ hasText: 'East hall (demo layout)' })).toContainText('Active');
});

test('a workbook with errors shows the error table and saves nothing', async ({ page }) => {
  await signInAsSupervisor(page);
  await page.goto('/floor-plans');
  const rows = page.getByTestId('plan-table').locator('tbody tr');
  await expect(rows.first()).toBeVisible();
  const before = await rows.count();
  await page
    .getByTestId('plan-upload')
    .locator('input[type=file]')
    .setInputFiles({
      name: 'broken.xlsx',
      mimeType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
      buffer: Buffer.from('not a workbook at all'),
    });
  await expect(page.getByTestId('error-table')).toBeVisible({ timeout: 60_000 });
  await expect(page.getByText(/nothing was saved/).first()).toBeVisible();
  await expect(page.getByTestId('errors-xlsx')).toHaveAttribute('href', /\/errors\?format=xlsx$/);
  await expect(rows).toHaveCount(before);
});
