import { expect, test, type Page } from '@playwright/test';
import * as XLSX from 'xlsx';

const PASSWORD = 'demo-password-1';

async function signIn(page: Page, email: string): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page).not.toHaveURL(/sign-in/);
}

/** An invented order history over the demo SKUs: 9 days × 40 orders, popularity 20/80 (ABC curve, A = 1/15). */
function historyWorkbook(skus: string[]): Buffer {
  let seed = 11;
  const rnd = () => {
    seed = (seed * 1103515245 + 12345) % 2147483648;
    return seed / 2147483648;
  };
  const rows: unknown[][] = [['order', 'sku', 'qty', 'due', 'priority']];
  for (let d = 0; d < 9; d++) {
    for (let k = 0; k < 40; k++) {
      const seen = new Set<string>();
      const n = 1 + Math.floor(rnd() * 4);
      for (let i = 0; i < n; i++) {
        const u = rnd();
        const x = u / 15 / (1 + 1 / 15 - u);
        const sku = skus[Math.min(skus.length - 1, Math.floor(x * skus.length))]!;
        if (seen.has(sku)) continue;
        seen.add(sku);
        rows.push([`HIST-${d}-${k}`, sku, 1, `2026-11-${String(10 + d).padStart(2, '0')}T15:00:00Z`, '']);
      }
    }
  }
  const wb = XLSX.utils.book_new();
  XLSX.utils.book_append_sheet(wb, XLSX.utils.aoa_to_sheet(rows), 'orders');
  return XLSX.write(wb, { type: 'buffer', bookType: 'xlsx' }) as Buffer;
}

test('an engineer runs slotting on an uploaded history, a supervisor applies its moves', async ({ page, browser }) => {
  test.setTimeout(240_000);
  await signIn(page, 'engineer@demo.aislewright.test');
  const me = await (await page.request.get('/api/auth/me')).json();
  const siteId = me.sites.find((s: { code: string }) => s.code === 'BWE')?.id ?? me.sites[0].id;
  const skus: string[] = (await (await page.request.get(`/api/sites/${siteId}/skus`)).json()).map((s: { sku: string }) => s.sku);
  expect(skus.length).toBeGreaterThan(100);

  await page.getByRole('link', { name: 'Slotting' }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Slotting' })).toBeVisible();
  await expect(page.getByText('No runs yet')).toBeVisible();
  await page.getByRole('textbox').first().fill('Browser test slotting');
  const [chooser] = await Promise.all([page.waitForEvent('filechooser'), page.getByRole('button', { name: 'Choose the file' }).click()]);
  await chooser.setFiles({
    name: 'history.xlsx',
    mimeType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
    buffer: historyWorkbook(skus),
  });
  await expect(page.getByText(/orders, .* lines over 9 days/)).toBeVisible();
  await page.getByRole('button', { name: 'Start the run' }).click();
  await expect(page).toHaveURL(/\/slotting\/\d+$/);

  await expect(page.getByText('Move list', { exact: true })).toBeVisible({ timeout: 180_000 });
  await expect(page.getByText(/On the 3 later days the method did not learn from/)).toBeVisible();
  await expect(page.getByText('Picks per bin now')).toBeVisible();
  const moves = page.locator('.n-data-table-tbody .n-data-table-tr');
  expect(await moves.count()).toBeGreaterThan(0);
  // Engineers read and download; applying is the supervisor's.
  await expect(page.getByRole('button', { name: /Apply all/ })).toHaveCount(0);
  const runUrl = page.url();

  // The supervisor, in a browser of their own.
  const context = await browser.newContext({ viewport: { width: 1366, height: 800 } });
  const sup = await context.newPage();
  await signIn(sup, 'supervisor@demo.aislewright.test');
  await sup.goto(runUrl);
  const applyAll = sup.getByRole('button', { name: /Apply all \d+ moves?/ });
  await expect(applyAll).toBeVisible({ timeout: 30_000 });
  await applyAll.click();
  await sup.getByRole('button', { name: 'Confirm' }).click();
  await expect(sup.getByText(/moves? applied to the SKU master/)).toBeVisible({ timeout: 30_000 });
  await expect(sup.getByRole('button', { name: /Apply all/ })).toHaveCount(0);
  await context.close();
});
