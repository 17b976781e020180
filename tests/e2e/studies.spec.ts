import { readFileSync } from 'node:fs';
import { expect, test } from '@playwright/test';
import * as XLSX from 'xlsx';
import { signInPage } from './harness/session';

const ENGINEER = 'engineer@demo.aislewright.test';

test('an engineer runs a generated study, reads the table and both charts, compares two routes and exports the workbook', async ({ page }) => {
  test.setTimeout(240_000);
  await signInPage(page, ENGINEER, '/studies');

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

  // The one-page summary for management: the question, the answer with its headline, one chart.
  const studyPath = new URL(page.url()).pathname;
  await expect(page.getByTestId('study-summary-link')).toHaveAttribute('href', `/print${studyPath}`);
  const summary = await page.context().newPage();
  await summary.goto(`/print${studyPath}`);
  await expect(summary.getByTestId('summary-question')).toContainText('How much picker walking would the routing methods save');
  await expect(summary.getByTestId('summary-headline')).toContainText(/of picker time a day, \d+\.\d % less walking/);
  await expect(summary.getByTestId('summary-answer')).toContainText('switching from S-shape to the default method saves');
  await expect(summary.getByTestId('summary-chart').locator('svg')).toBeVisible();
  await summary.screenshot({ path: 'test-results/study-summary.png', fullPage: true });
  await summary.close();

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

test('the new-study form describes each method and shows a refused what-if on its field; the result keeps the Note in view at 1366 px', async ({ page }) => {
  test.setTimeout(240_000);
  await page.setViewportSize({ width: 1366, height: 800 });
  await signInPage(page, ENGINEER, '/studies');
  await page.getByRole('button', { name: 'New study' }).click();

  // Each method carries its description beside its name.
  await expect(page.getByText('Then deep search: a Lin–Kernighan search with 3-opt steps, then repeated random double-bridge kicks').first()).toBeVisible();
  await expect(page.getByText('and swaps of two stretches, plus exchanges of up to four links on trips of over 150 stops').first()).toBeVisible();
  await expect(page.getByText('the usual rule when nothing else is planned')).toBeVisible();
  await expect(page.getByText('Carts are merged pairwise where sharing a trip saves the most walking.').first()).toBeVisible();

  await page.getByTestId('study-name').locator('input').fill('Browser what-if study');
  await page.getByTestId('orders-waves').locator('input').fill('1');
  await page.getByTestId('orders-per-wave').locator('input').fill('16');
  await page.getByTestId('orders-per-wave').locator('input').blur();

  // A depot far outside the plan is refused, and the form says so under the field.
  await page.getByRole('button', { name: 'Move the depot' }).click();
  await page.getByTestId('depot-x').locator('input').fill('900');
  await page.getByTestId('depot-x').locator('input').blur();
  await page.getByRole('button', { name: 'Run study' }).click();
  await expect(page.getByText('The study was not started')).toBeVisible();
  await expect(page.getByTestId('what-if-0')).toContainText('the depot at x = 900 m would lie outside the plan');
  await expect(page).toHaveURL('/studies/new');

  // A cross aisle where the demo plan has one is refused too; elsewhere the study runs.
  await page.getByRole('button', { name: 'Remove' }).click();
  await page.getByRole('button', { name: 'Add a cross aisle' }).click();
  await page.getByTestId('cross-aisle-y').locator('input').fill('24');
  await page.getByTestId('cross-aisle-y').locator('input').blur();
  await page.getByRole('button', { name: 'Run study' }).click();
  await expect(page.getByTestId('what-if-0')).toContainText('already has a cross aisle');
  await page.getByTestId('cross-aisle-y').locator('input').fill('12');
  await page.getByTestId('cross-aisle-y').locator('input').blur();
  await page.getByRole('button', { name: 'Run study' }).click();
  await expect(page).toHaveURL(/\/studies\/\d+$/);

  const table = page.getByTestId('routing-table');
  await expect(table).toBeVisible({ timeout: 180_000 });
  await expect(page.getByTestId('lower-bound')).toContainText(/Lower bound: [\d,.]+ m/);
  await expect(table.getByRole('row').filter({ hasText: 'S-shape (traversal)' })).toContainText('zig-zagging');

  // On the demo plan (a middle cross aisle) the single-block policies do not apply on either plan: the row says why,
  // and the Note cell is inside the window without scrolling sideways.
  const whatIf = page.getByTestId('what-if-table');
  const note = whatIf.getByRole('row').filter({ hasText: 'Largest gap' }).getByTestId('what-if-note');
  await note.scrollIntoViewIfNeeded();
  await expect(note).toContainText(/does not apply on (either plan|the what-if|the plan as it is): /);
  const box = (await note.boundingBox())!;
  expect(box.x + box.width).toBeLessThanOrEqual(1366);
  expect(box.x).toBeGreaterThan(600);

  // The study is deleted after a confirmation; the list no longer has it.
  await page.getByTestId('delete-study').click();
  await page.getByRole('button', { name: 'Delete', exact: true }).last().click();
  await expect(page).toHaveURL('/studies');
  await expect(page.getByText('Browser what-if study')).toHaveCount(0);
});

interface Geometry {
  aisles: { code: string; x: number; yStart: number; yEnd: number }[];
  crossAisles: { code: string; y: number; xStart: number; xEnd: number }[];
  bins: { code: string; aisle: string; y: number; side: string; level: number; zone: string | null }[];
  depots: { code: string; x: number; y: number }[];
}

/** A floor-plan workbook in the upload's format (the template's four sheets) from a plan's geometry. */
function planWorkbook(g: Geometry): Buffer {
  const wb = XLSX.utils.book_new();
  const sheet = (name: string, rows: (string | number | null)[][]) => XLSX.utils.book_append_sheet(wb, XLSX.utils.aoa_to_sheet(rows), name);
  sheet('aisles', [['aisle', 'x_m', 'y_start_m', 'y_end_m', 'bay_length_m'], ...g.aisles.map((a) => [a.code, a.x, a.yStart, a.yEnd, null])]);
  sheet('cross_aisles', [['cross_aisle', 'y_m', 'x_start_m', 'x_end_m'], ...g.crossAisles.map((c) => [c.code, c.y, c.xStart, c.xEnd])]);
  sheet('bins', [['bin', 'aisle', 'y_m', 'bay', 'side', 'level', 'zone'], ...g.bins.map((b) => [b.code, b.aisle, b.y, null, b.side, b.level, b.zone])]);
  sheet('depots', [['depot', 'x_m', 'y_m'], ...g.depots.map((d) => [d.code, d.x, d.y])]);
  return XLSX.write(wb, { type: 'buffer', bookType: 'xlsx' }) as Buffer;
}

test('an engineer runs three replications with a candidate layout, reads means with 95 % intervals, then archives the study and brings it back', async ({
  page,
}) => {
  test.setTimeout(360_000);
  await page.setViewportSize({ width: 1366, height: 800 });
  await signInPage(page, ENGINEER, '/studies');
  const me = await (await page.request.get('/api/auth/me')).json();
  const siteId = me.sites.find((s: { code: string }) => s.code === 'BWE')?.id ?? me.sites[0].id;
  const active = (await (await page.request.get(`/api/sites/${siteId}/floor-plans/active`)).json()) as { geometry: Geometry };

  await page.getByRole('button', { name: 'New study' }).click();
  await page.getByTestId('study-name').locator('input').fill('Replicated browser study');
  await page.getByTestId('orders-waves').locator('input').fill('1');
  await page.getByTestId('orders-per-wave').locator('input').fill('12');
  await page.getByTestId('replications').locator('input').fill('3');
  await page.getByTestId('replications').locator('input').blur();
  await expect(page.getByText(/each method's mean with a 95 % interval; 3× the run time/)).toBeVisible();
  await page.screenshot({ path: 'test-results/studies3-form.png' });

  // Recorded waves have nothing to replicate: the field gives way to a plain sentence.
  await page.getByText('Recorded waves', { exact: true }).click();
  await expect(page.getByTestId('replications')).toHaveCount(0);
  await expect(page.getByTestId('replications-recorded')).toContainText('Recorded waves happened once: there is nothing to replicate.');
  await page.screenshot({ path: 'test-results/studies3-form-recorded.png' });
  await page.getByText('Generated scenario', { exact: true }).click();
  await expect(page.getByTestId('replications').locator('input')).toHaveValue('3');

  // A bad candidate workbook: its problems row by row, and the form keeps what was typed.
  const bad = structuredClone(active.geometry);
  bad.bins[0] = { ...bad.bins[0]!, aisle: 'QQ' };
  bad.bins[2] = { ...bad.bins[2]!, code: bad.bins[1]!.code };
  await page
    .getByTestId('candidate-upload')
    .locator('input[type=file]')
    .setInputFiles({
      name: 'candidate-bad.xlsx',
      mimeType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
      buffer: planWorkbook(bad),
    });
  const problems = page.getByTestId('candidate-problems');
  await expect(problems).toContainText('Nothing was saved: 2 problems to fix');
  await expect(problems.getByRole('row').filter({ hasText: 'QQ' })).toContainText('bins');
  await expect(page.getByTestId('study-name').locator('input')).toHaveValue('Replicated browser study');
  await expect(page.getByTestId('replications').locator('input')).toHaveValue('3');
  await problems.scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/studies3-candidate-problems.png' });

  // The site's own layout as a candidate: checked, kept for studies, added as a what-if.
  await page
    .getByTestId('candidate-upload')
    .locator('input[type=file]')
    .setInputFiles({
      name: 'candidate-east-hall.xlsx',
      mimeType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
      buffer: planWorkbook(active.geometry),
    });
  await expect(page.getByTestId('candidate-layout')).toContainText(`candidate-east-hall.xlsx: ${active.geometry.aisles.length} aisles`);
  await expect(page.getByTestId('candidate-problems')).toHaveCount(0);
  await page.getByRole('button', { name: 'Run study' }).click();
  await expect(page).toHaveURL(/\/studies\/\d+$/);
  await expect(page.getByTestId('study-phase')).toContainText(/Replication \d of 3/, { timeout: 60_000 });

  const table = page.getByTestId('routing-table');
  await expect(table).toBeVisible({ timeout: 300_000 });
  await expect(table.getByRole('columnheader', { name: 'Mean of 3 seeds (95 % interval)' })).toBeVisible();
  await expect(table.getByRole('row').filter({ hasText: 'S-shape (traversal)' })).toContainText(/[\d,.]+ m ± [\d,.]+ m/);
  await expect(page.getByTestId('replications-note')).toContainText('3 replications (seeds 1, 2, 3)');
  await expect(page.getByTestId('what-if-table')).toContainText('Candidate: candidate-east-hall');
  await expect(page.getByTestId('chart-total').locator('canvas')).toBeVisible({ timeout: 30_000 });
  await page.screenshot({ path: 'test-results/studies3-replications.png' });
  await page.getByTestId('chart-total').scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'test-results/studies3-chart.png' });

  const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-workbook').click()]);
  const wb = XLSX.read(readFileSync(await download.path()), { type: 'buffer' });
  const rep = XLSX.utils.sheet_to_json<(string | number)[]>(wb.Sheets.replications!, { header: 1 });
  expect(rep.filter((r) => r[2] === 's-shape' && r[1] === 'routing').map((r) => r[4])).toEqual(expect.arrayContaining(['seed 1', 'seed 3', 'mean of 3']));

  // Archive: gone from the list, back with "Show archived", and unarchived from its page.
  const studyPath = new URL(page.url()).pathname;
  await page.getByTestId('archive-study').click();
  await expect(page.getByTestId('archived-tag')).toBeVisible();
  await page.goto('/studies');
  await expect(page.getByRole('heading', { level: 1, name: 'Studies' })).toBeVisible();
  await expect(page.getByText('Replicated browser study')).toHaveCount(0);
  await page.getByTestId('show-archived').click();
  const row = page.getByRole('row').filter({ hasText: 'Replicated browser study' });
  await expect(row).toContainText('Archived');
  await page.screenshot({ path: 'test-results/studies3-archived-list.png' });
  await row.click();
  await expect(page).toHaveURL(studyPath);
  await page.getByTestId('unarchive-study').click();
  await expect(page.getByTestId('archived-tag')).toHaveCount(0);
  await page.goto('/studies');
  await expect(page.getByText('Replicated browser study')).toBeVisible();
});
