import { createRouter, createWebHistory, type Router, type RouterHistory } from 'vue-router';
import { routes } from './routes';
import { decideAccess, signInLocation, type SignInMode } from './access';
import type { Role } from '@shared/common';

export { routes } from './routes';

/** What the guards need from the session; the Pinia store fits, and so does a plain test double. */
export interface SessionPort {
  readonly role: Role | null;
  readonly signInMode: SignInMode;
  ensureLoaded(): Promise<void>;
  forget(): void;
}

export function installGuards(router: Router, session: SessionPort): void {
  router.beforeEach(async (to) => {
    await session.ensureLoaded();
    const access = decideAccess(to, session.role, session.signInMode);
    return access.kind === 'redirect' ? access.to : true;
  });
  router.afterEach((to) => {
    document.title = to.meta.title ? `${to.meta.title} · Aislewright` : 'Aislewright';
  });
}

/**
 * A 401 from any call: forget the session and go to sign-in, remembering the page to come back to.
 * Resolves to the sign-in location used, or null when already on a public page.
 */
export async function handleSessionExpired(router: Router, session: SessionPort): Promise<string | null> {
  const current = router.currentRoute.value;
  session.forget();
  if (current.meta.public) return null;
  const target = signInLocation(current.fullPath, session.signInMode);
  await router.push(target);
  return target;
}

export function createAppRouter(history: RouterHistory = createWebHistory()): Router {
  return createRouter({ history, routes, scrollBehavior: () => ({ top: 0 }) });
}
