import { expect, test, type Page } from '@playwright/test';

/** Demo sign-ins seeded on an empty database (README.md, demo sign-ins). */
const PASSWORD = 'demo-password-1';
const OFFICE = [
  { role: 'admin', email: 'admin@demo.aislewright.test', home: '/admin/users', heading: 'Users', menu: ['Users', 'Sites & settings', 'Mail outbox'] },
  { role: 'supervisor', email: 'supervisor@demo.aislewright.test', home: '/waves', heading: 'Waves', menu: ['Floor plans', 'Orders', 'Waves', 'Live board'] },
  { role: 'engineer', email: 'engineer@demo.aislewright.test', home: '/studies', heading: 'Studies', menu: ['Floor plans', 'Waves', 'Studies'] },
] as const;
const ADMIN_ONLY = ['Users', 'Sites & settings', 'Mail outbox'];

async function signInByEmail(page: Page, email: string): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
}

async function signInByBadge(page: Page, badge: string, pin: string): Promise<void> {
  await page.goto('/sign-in/badge');
  // A scanner types the code and presses Enter; the PIN goes in on the on-screen keypad.
  await page.locator('#badge').pressSequentially(badge);
  await page.locator('#badge').press('Enter');
  const keypad = page.getByRole('region', { name: 'PIN keypad' });
  for (const digit of pin) await keypad.getByRole('button', { name: digit, exact: true }).click();
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
}

for (const user of OFFICE) {
  test(`${user.role} signs in through the page and lands on their home with their menu`, async ({ page }) => {
    await signInByEmail(page, user.email);
    await expect(page).toHaveURL(user.home);
    await expect(page.getByRole('heading', { level: 1, name: user.heading })).toBeVisible();
    const menu = page.getByRole('navigation', { name: 'Main' });
    for (const label of user.menu) await expect(menu.getByRole('menuitem', { name: label, exact: true })).toBeVisible();
    if (user.role !== 'admin') {
      for (const label of ADMIN_ONLY) await expect(menu.getByRole('menuitem', { name: label, exact: true })).toHaveCount(0);
    }
  });
}

test('picker signs in with badge and PIN and lands on the trip screen with the safety caution', async ({ page }) => {
  await signInByBadge(page, 'P-1001', '246810');
  await expect(page).toHaveURL('/pick');
  // README.md, Safety: every picker screen carries the caution, shown from the start.
  await expect(page.getByRole('note').filter({ hasText: 'forklift traffic rules' }).first()).toBeVisible();
  await expect(page.getByRole('button', { name: 'Sign out' })).toBeVisible();
});

test('a picker who opens an admin page sees the not-allowed page, not the page or a blank screen', async ({ page }) => {
  await signInByBadge(page, 'P-1002', '246810');
  await expect(page).toHaveURL('/pick');
  await page.goto('/admin/users');
  await expect(page).toHaveURL('/admin/users');
  await expect(page.getByRole('heading', { name: "You don't have access to this page" })).toBeVisible();
  await expect(page.getByText('Robin Picker (Picker, badge P-1002)')).toBeVisible();
  await expect(page.getByRole('heading', { name: 'Users', exact: true })).toHaveCount(0);
  await page.getByRole('button', { name: 'Go to my home page' }).click();
  await expect(page).toHaveURL('/pick');
});

test('a visitor asking for a page signs in and comes back to it', async ({ page }) => {
  await page.goto('/admin/outbox');
  await expect(page).toHaveURL(/\/sign-in\?next=/);
  await page.getByLabel('E-mail').fill('admin@demo.aislewright.test');
  await page.getByLabel('Password').fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page).toHaveURL('/admin/outbox');
  await expect(page.getByRole('heading', { level: 1, name: 'Mail outbox' })).toBeVisible();
});

test('wrong password shows a message on the sign-in page', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('engineer@demo.aislewright.test');
  await page.getByLabel('Password').fill('not-the-password');
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page.getByRole('alert')).toBeVisible();
  await expect(page).toHaveURL('/sign-in');
});

test('when the session ends mid-work, the next call leads to sign-in and back to the same page', async ({ page, context }) => {
  await signInByEmail(page, 'admin@demo.aislewright.test');
  await expect(page).toHaveURL('/admin/users');
  // Dropping the cookie stands in for a session that expired or was ended by an admin.
  await context.clearCookies();
  await page.getByRole('navigation', { name: 'Main' }).getByRole('menuitem', { name: 'Mail outbox' }).click();
  await expect(page).toHaveURL(/\/sign-in\?next=(%2F|\/)admin(%2F|\/)outbox/);
  await expect(page.getByText('Your session has ended')).toBeVisible();
  await page.getByLabel('E-mail').fill('admin@demo.aislewright.test');
  await page.getByLabel('Password').fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page).toHaveURL('/admin/outbox');
});
