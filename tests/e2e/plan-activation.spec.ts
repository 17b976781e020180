/**
 * The activation dialog (issue 10, item 8): activating a plan that drops bins shows what would be
 * lost and needs an explicit acknowledgement; the retired plan can be activated again from its page.
 * A site of its own, so the demo plan the other browser tests pick on is never touched; its name sorts
 * after the demo site's, because sites are listed by name and the first one is the default.
 */
import { expect, request, test, type APIRequestContext, type Page } from '@playwright/test';

const CSRF = { 'x-aislewright': '1' };

async function signIn(baseURL: string, email: string): Promise<APIRequestContext> {
  const api = await request.newContext({ baseURL, extraHTTPHeaders: CSRF });
  expect((await api.post('/api/auth/sign-in', { data: { email, password: 'demo-password-1' } })).status()).toBe(200);
  return api;
}

async function generate(api: APIRequestContext, siteId: number, name: string, aisles: number): Promise<number> {
  const res = await api.post(`/api/sites/${siteId}/floor-plans/generate`, {
    data: { name, params: { aisles, aisleLengthM: 20, aisleSpacingM: 4, baysPerAisle: 4, levels: 1, crossAisles: { front: true, back: true, middle: 0 } } },
  });
  expect(res.status(), await res.text()).toBe(202);
  let job = (await res.json()) as { id: string; finishedAt: string | null; status: string; planId: number | null };
  for (let i = 0; i < 300 && !job.finishedAt; i++) {
    await new Promise((r) => setTimeout(r, 200));
    job = (await (await api.get(`/api/sites/${siteId}/floor-plans/jobs/${job.id}`)).json()) as typeof job;
  }
  expect(job.status).toBe('done');
  return job.planId!;
}

const csv = (rows: (string | number)[][]) => Buffer.from(rows.map((r) => r.join(',')).join('\r\n') + '\r\n');

/**
 * A fresh site with plan "Two aisles" active, one SKU per bin and one open order per SKU, and a draft
 * "One aisle" that drops aisle B. Returns the site and both plan ids.
 */
async function setUpSite(baseURL: string): Promise<{ siteId: number; twoAisles: number; oneAisle: number; dropped: number; skus: number }> {
  const admin = await signIn(baseURL, 'admin@demo.aislewright.test');
  const code = `PA${Date.now() % 100000}`;
  const site = (await (await admin.post('/api/sites', { data: { code, name: `Rollback test hall ${code}` } })).json()) as { id: number };
  const users = (await (await admin.get('/api/users')).json()) as { id: number; email: string | null; siteIds: number[] }[];
  const sup = users.find((u) => u.email === 'supervisor@demo.aislewright.test')!;
  expect((await admin.patch(`/api/users/${sup.id}`, { data: { siteIds: [...sup.siteIds, site.id] } })).status()).toBe(200);
  await admin.dispose();

  const api = await signIn(baseURL, 'supervisor@demo.aislewright.test');
  const twoAisles = await generate(api, site.id, 'Two aisles', 2);
  expect((await api.post(`/api/sites/${site.id}/floor-plans/${twoAisles}/activate`)).status()).toBe(200);
  const geometry = (await (await api.get(`/api/sites/${site.id}/floor-plans/${twoAisles}/geometry`)).json()) as { bins: { code: string; aisle: string }[] };
  const skuRows = geometry.bins.map((b, i) => [`T-${100 + i}`, `Test item ${i}`, b.code, 1, 1]);
  const skuFile = { name: 'skus.csv', mimeType: 'text/csv', buffer: csv([['sku', 'description', 'bin', 'unit_weight_kg', 'unit_volume_l'], ...skuRows]) };
  const s = await api.post(`/api/sites/${site.id}/skus/import`, { multipart: { file: skuFile } });
  expect(s.status(), await s.text()).toBe(200);
  const orderFile = {
    name: 'orders.csv',
    mimeType: 'text/csv',
    buffer: csv([['order', 'sku', 'qty'], ...skuRows.map((r, i) => [`PA-${1000 + i}`, r[0]!, 1])]),
  };
  const o = await api.post(`/api/sites/${site.id}/orders/import`, { multipart: { file: orderFile } });
  expect(o.status(), await o.text()).toBe(200);
  const oneAisle = await generate(api, site.id, 'One aisle', 1);
  await api.dispose();
  return { siteId: site.id, twoAisles, oneAisle, dropped: geometry.bins.filter((b) => b.aisle === 'B').length, skus: skuRows.length };
}

async function signInPage(page: Page, siteId: number): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('supervisor@demo.aislewright.test');
  await page.getByLabel('Password').fill('demo-password-1');
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page).toHaveURL('/waves');
  await page.evaluate((id) => localStorage.setItem('aislewright.siteId', String(id)), siteId);
}

test('activating a plan that drops bins needs an acknowledgement, and the retired plan can be rolled back to', async ({ page, baseURL }) => {
  const { siteId, twoAisles, oneAisle, dropped, skus } = await setUpSite(baseURL!);
  expect(dropped).toBeGreaterThan(0);
  await signInPage(page, siteId);

  await page.goto(`/floor-plans/${oneAisle}`);
  await expect(page.getByTestId('plan-state')).toHaveText(/Draft/);
  await page.getByTestId('activate').click();
  const dialog = page.getByTestId('activate-dialog');
  await expect(dialog.getByTestId('check-skus')).toContainText(`${dropped} of ${skus} SKUs`);
  await expect(dialog.getByTestId('check-skus')).toContainText(`${dropped} of them have a bin on the active plan now`);
  await expect(dialog.getByTestId('check-orders')).toContainText(`${dropped} of ${skus} open orders`);
  await expect(dialog.getByTestId('check-waves')).toContainText('0');
  await expect(dialog.getByTestId('check-loss')).toBeVisible();
  const activate = dialog.getByRole('button', { name: /^Activate v\d+$/ });
  await expect(activate).toBeDisabled();

  // The list is downloadable, with every dropped SKU.
  const href = await dialog.getByTestId('skus-without-bin-xlsx').getAttribute('href');
  const file = await page.request.get(href!);
  expect(file.status()).toBe(200);
  expect(file.headers()['content-type']).toContain('spreadsheetml');
  const list = await page.request.get(href!.replace('format=xlsx', 'format=csv'));
  expect((await list.text()).trim().split('\r\n')).toHaveLength(dropped + 1);

  await page.screenshot({ path: test.info().outputPath('activation-dialog.png') });
  await dialog.getByTestId('acknowledge').click();
  await expect(activate).toBeEnabled();
  await activate.click();
  await expect(dialog).toBeHidden();
  await expect(page.getByTestId('plan-state')).toHaveText(/Active/);

  // Rollback: the retired plan is activated again from its page, with nothing lost.
  await page.goto(`/floor-plans/${twoAisles}`);
  await expect(page.getByTestId('plan-state')).toHaveText(/Retired/);
  await page.getByTestId('activate').click();
  await expect(page.getByTestId('activate-dialog').getByTestId('check-ok')).toContainText('Nothing is lost');
  await expect(page.getByTestId('activate-dialog').getByTestId('check-skus')).toContainText(`0 of ${skus} SKUs`);
  await page.screenshot({ path: test.info().outputPath('rollback-dialog.png') });
  await page
    .getByTestId('activate-dialog')
    .getByRole('button', { name: /^Activate v\d+$/ })
    .click();
  await expect(page.getByTestId('plan-state')).toHaveText(/Active/);
  await page.getByRole('button', { name: 'All versions' }).click();
  const rows = page.getByTestId('plan-table').locator('tbody tr');
  await expect(rows.filter({ hasText: 'One aisle' })).toContainText('Retired');
  await expect(rows.filter({ hasText: 'Two aisles' })).toContainText('Active');
});
