import { expect, test, type Page } from '@playwright/test';

/** The admin's data-safety screens: Backups, Integration tokens (Sites & settings), Audit log, Exports. */
async function signInAsAdmin(page: Page): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('admin@demo.aislewright.test');
  await page.getByLabel('Password').fill('demo-password-1');
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page).toHaveURL('/admin/users');
}

test('an admin backs up now, creates and revokes an integration token, and finds both in the audit log', async ({ page }) => {
  test.setTimeout(120_000);
  await signInAsAdmin(page);
  const menu = page.getByRole('navigation', { name: 'Main' });

  await menu.getByRole('menuitem', { name: 'Backups', exact: true }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Backups' })).toBeVisible();
  await expect(page.getByText('How to restore', { exact: true })).toBeVisible();
  await expect(page.getByText('aislewright backup restore', { exact: false }).first()).toBeVisible();
  await page.getByRole('button', { name: 'Back up now' }).click();
  await expect(page.getByText(/is made and checked/)).toBeVisible({ timeout: 30_000 });
  const row = page.getByRole('row').filter({ hasText: 'Back up now' });
  await expect(row.getByText('✓ Integrity check passed')).toBeVisible({ timeout: 30_000 });
  const link = row.getByRole('link', { name: /Download aislewright-\d{8}-\d{6}\.sqlite/ });
  const download = page.waitForEvent('download');
  await link.click();
  expect((await download).suggestedFilename()).toMatch(/^aislewright-\d{8}-\d{6}\.sqlite$/);

  await menu.getByRole('menuitem', { name: 'Sites & settings', exact: true }).click();
  const card = page.locator('.n-card').filter({ has: page.getByText('Integration tokens', { exact: true }) });
  await card.getByRole('button', { name: 'Create token' }).click();
  const dialog = page.getByRole('dialog');
  await dialog.getByLabel('Name').fill('Host order system');
  await dialog.getByRole('button', { name: 'Create token' }).click();
  const secret = page.getByTestId('new-token');
  await expect(secret).toHaveText(/^awi_[\w-]{40,}$/);
  const token = (await secret.textContent())!;
  await expect(page.getByText('Shown once')).toBeVisible();
  await expect(page.locator('pre').filter({ hasText: `Bearer ${token}` })).toContainText('/orders/push');
  await expect(page.getByRole('button', { name: 'Copy token' })).toBeVisible();
  await page.getByRole('button', { name: 'I have copied it' }).click();
  await expect(page.getByTestId('new-token')).toHaveCount(0);
  const tokenRow = card.getByRole('row').filter({ hasText: 'Host order system' });
  await expect(tokenRow).toContainText('Avery Admin');
  await expect(tokenRow).toContainText('Never');
  await expect(tokenRow.getByText('✓ Active')).toBeVisible();
  // The secret is not on the page any more: only its first characters.
  await expect(page.getByText(token)).toHaveCount(0);
  await tokenRow.getByRole('button', { name: 'Revoke' }).click();
  await page.getByRole('dialog').getByRole('button', { name: 'Revoke' }).click();
  await expect(tokenRow.getByText('✕ Revoked')).toBeVisible();

  await menu.getByRole('menuitem', { name: 'Audit log', exact: true }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Audit log' })).toBeVisible();
  const table = page.locator('.n-data-table');
  await expect(table.getByText('integration-token.created')).toBeVisible();
  await expect(table.getByText('backup.created').first()).toBeVisible();
  await page.getByLabel('Action', { exact: true }).click();
  await page.locator('.n-base-select-option').filter({ hasText: 'integration-token.revoked' }).click();
  await expect(table.getByText('integration-token.created')).toHaveCount(0);
  await expect(table.getByText('integration-token.revoked')).toBeVisible();
  await expect(page.getByText('1 entries')).toBeVisible();
  await expect(page.getByRole('link', { name: 'Export CSV' })).toHaveAttribute(
    'href',
    /\/api\/audit-log\/export\?action=integration-token\.revoked&format=csv/,
  );
  const csv = page.waitForEvent('download');
  await page.getByRole('link', { name: 'Export CSV' }).click();
  expect((await csv).suggestedFilename()).toMatch(/^audit-log-all-\d{4}-\d{2}-\d{2}\.csv$/);

  await menu.getByRole('menuitem', { name: 'Exports', exact: true }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Exports' })).toBeVisible();
  const siteData = page.waitForEvent('download');
  await page.getByRole('link', { name: 'Site data · xlsx' }).click();
  expect((await siteData).suggestedFilename()).toMatch(/^site-data-.+\.xlsx$/);
});

test('a supervisor sees the audit log of their site, not the admin screens', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('supervisor@demo.aislewright.test');
  await page.getByLabel('Password').fill('demo-password-1');
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page).toHaveURL('/waves');
  const menu = page.getByRole('navigation', { name: 'Main' });
  await expect(menu.getByRole('menuitem', { name: 'Backups', exact: true })).toHaveCount(0);
  await menu.getByRole('menuitem', { name: 'Audit log', exact: true }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Audit log' })).toBeVisible();
  await expect(page.getByLabel('Site')).toContainText('BWE');
  await page.goto('/admin/backups');
  await expect(page.getByRole('heading', { name: "You don't have access to this page" })).toBeVisible();
});
