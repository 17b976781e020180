import { expect, request, type APIRequestContext, type Page } from '@playwright/test';

/** The header every unsafe call from our client carries (the server's CSRF check). */
export const CSRF = { 'x-aislewright': '1' } as const;
export const DEMO_PASSWORD = 'demo-password-1';

/** An API context signed in as the demo supervisor (`ignoreHTTPSErrors` for a server with a test certificate). */
export async function supervisorApi(baseURL: string, opts: { ignoreHTTPSErrors?: boolean } = {}): Promise<APIRequestContext> {
  const api = await request.newContext({ baseURL, extraHTTPHeaders: CSRF, ignoreHTTPSErrors: opts.ignoreHTTPSErrors ?? false });
  const res = await api.post('/api/auth/sign-in', { data: { email: 'supervisor@demo.aislewright.test', password: DEMO_PASSWORD } });
  expect(res.status()).toBe(200);
  return api;
}

/** Signs in through the sign-in page as an office user and waits for their home page. */
export async function signInPage(page: Page, email: string, home: string | RegExp): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await expect(page).toHaveURL(home);
}
