import { describe, expect, it } from 'vitest';
import { afterSignIn, decideAccess, isRoleAllowed, ROLE_HOME, safeNext, signInLocation, type Target } from '@client/router/access';
import { menuFor, routes } from '@client/router/routes';
import { ROLES } from '@shared/common';

const page = (fullPath: string, meta: Target['meta'], query: Record<string, unknown> = {}): Target => ({ fullPath, meta, query });

describe('isRoleAllowed', () => {
  it('lets every signed-in role open a page that names no roles', () => {
    for (const role of ROLES) expect(isRoleAllowed(undefined, role)).toBe(true);
  });
  it('lets only the named roles open a page that names some', () => {
    expect(isRoleAllowed(['admin'], 'admin')).toBe(true);
    expect(isRoleAllowed(['admin'], 'picker')).toBe(false);
    expect(isRoleAllowed(['supervisor', 'engineer'], 'engineer')).toBe(true);
  });
});

describe('decideAccess', () => {
  it('sends a visitor without a session to sign-in with the page as next', () => {
    expect(decideAccess(page('/admin/users?tab=invites', { roles: ['admin'] }), null)).toEqual({
      kind: 'redirect',
      to: '/sign-in?next=%2Fadmin%2Fusers%3Ftab%3Dinvites',
    });
  });
  it('sends a shared tablet back to the badge page', () => {
    expect(decideAccess(page('/pick', { roles: ['picker'] }), null, 'badge')).toEqual({ kind: 'redirect', to: '/sign-in/badge?next=%2Fpick' });
  });
  it('opens public pages without a session', () => {
    expect(decideAccess(page('/reset-password?token=x', { public: true }), null)).toEqual({ kind: 'allow' });
  });
  it('moves a signed-in user off the sign-in page to next, or home', () => {
    expect(decideAccess(page('/sign-in', { public: true, guestOnly: true }), 'engineer')).toEqual({ kind: 'redirect', to: '/studies' });
    expect(decideAccess(page('/sign-in?next=/waves', { public: true, guestOnly: true }, { next: '/waves' }), 'supervisor')).toEqual({
      kind: 'redirect',
      to: '/waves',
    });
  });
  it('sends each role from / to its own home', () => {
    for (const role of ROLES) expect(decideAccess(page('/', { roleHome: true }), role)).toEqual({ kind: 'redirect', to: ROLE_HOME[role] });
  });
  it('answers not-allowed (never a redirect to nowhere) for a role the page does not list', () => {
    expect(decideAccess(page('/admin/users', { roles: ['admin'] }), 'picker')).toEqual({ kind: 'not-allowed' });
    expect(decideAccess(page('/admin/users', { roles: ['admin'] }), 'admin')).toEqual({ kind: 'allow' });
  });
});

describe('safeNext and afterSignIn', () => {
  it('follows only same-app paths', () => {
    expect(safeNext('/waves?id=3')).toBe('/waves?id=3');
    expect(safeNext('https://elsewhere.example/')).toBeNull();
    expect(safeNext('//elsewhere.example/')).toBeNull();
    expect(safeNext('/\\elsewhere.example')).toBeNull();
    expect(safeNext(['/waves'])).toBeNull();
  });
  it('goes home when next is missing, foreign or not open to the role', () => {
    const rolesAt = (path: string) => (path.startsWith('/admin') ? (['admin'] as const) : undefined);
    expect(afterSignIn('picker', undefined)).toBe('/pick');
    expect(afterSignIn('admin', 'https://elsewhere.example/')).toBe('/admin/users');
    expect(afterSignIn('picker', '/admin/users', rolesAt)).toBe('/pick');
    expect(afterSignIn('admin', '/admin/outbox', rolesAt)).toBe('/admin/outbox');
  });
  it('builds the sign-in location without an empty next', () => {
    expect(signInLocation('/')).toBe('/sign-in');
    expect(signInLocation('/pick', 'badge')).toBe('/sign-in/badge?next=%2Fpick');
  });
});

describe('route table', () => {
  it('gives every role a home that exists and that the role may open', () => {
    for (const role of ROLES) {
      const home = routes.find((r) => r.path === ROLE_HOME[role]);
      expect(home, role).toBeDefined();
      expect(isRoleAllowed(home?.meta?.roles, role), role).toBe(true);
    }
  });
  it('shows in each menu only entries the role may open', () => {
    for (const role of ROLES) {
      for (const entry of menuFor(role)) {
        const route = routes.find((r) => r.name === entry.name);
        expect(isRoleAllowed(route?.meta?.roles, role), `${role} → ${entry.label}`).toBe(true);
      }
    }
    expect(menuFor('picker').map((e) => e.label)).toEqual(['My trip']);
    expect(menuFor('admin').map((e) => e.label)).toEqual(expect.arrayContaining(['Users', 'Sites & settings', 'Mail outbox']));
    for (const role of ['supervisor', 'engineer', 'picker'] as const)
      expect(
        menuFor(role).some((e) => e.group === 'Admin'),
        role,
      ).toBe(false);
    expect(menuFor('supervisor').map((e) => e.label)).toEqual(expect.arrayContaining(['Floor plans', 'Orders', 'Waves', 'Live board']));
    expect(menuFor('engineer').map((e) => e.label)).toEqual(expect.arrayContaining(['Studies']));
  });
  it('marks every non-public page with roles or as open to all signed-in users on purpose', () => {
    const openToAll = routes.filter((r) => !r.meta?.public && !r.meta?.roles).map((r) => r.name);
    expect(openToAll).toEqual(['home', 'not-found']);
  });
});
