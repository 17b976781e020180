import Database from 'better-sqlite3';
import { expect, type Page } from '@playwright/test';

/** The demo pickers' PIN (server/seed/demo.ts). */
export const DEMO_PIN = '246810';

/** Signs a picker in on the badge page (badge typed and Enter, PIN on the keyboard) and waits for the pick screen; `base` for another origin. */
export async function badgeSignIn(page: Page, badge: string, base = ''): Promise<void> {
  await page.goto(`${base}/sign-in/badge`);
  await page.locator('#badge').fill(badge);
  await page.keyboard.press('Enter');
  for (const d of DEMO_PIN) await page.keyboard.press(d);
  await page.keyboard.press('Enter');
  await page.waitForURL('**/pick');
}

/** Through the trip start (safety caution) and the cart set-up (each tote's "Tote N ready" tapped) to the first stop. */
export async function openTrip(page: Page): Promise<void> {
  await page.getByRole('button', { name: 'I understand' }).click();
  await expect(page.getByTestId('cart-setup')).toBeVisible();
  while ((await page.getByTestId('tote-ready').count()) > 0) await page.getByTestId('tote-ready').first().click();
  await expect(page.getByTestId('current-bin')).toBeVisible();
}

/** "n of m lines" as a whole count: a plain substring would let "1 of 11" pass on "11 of 11". */
export const linesDone = (done: number, lines: number): RegExp => new RegExp(`(^|\\D)${done} of ${lines} lines`);

/** The suite's server keeps its database per port (playwright.config.ts). */
export const suiteDbFile = (baseURL: string): string => `test-results/e2e-db-${new URL(baseURL).port}/aislewright.sqlite`;

/** Rows read straight from a server's database file, opened read-only. */
export function dbRows<T>(file: string, sql: string, ...args: unknown[]): T[] {
  const db = new Database(file, { readonly: true, fileMustExist: true });
  try {
    return db.prepare(sql).all(...args) as T[];
  } finally {
    db.close();
  }
}
