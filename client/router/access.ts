import type { Role } from '@shared/common';

/** Where each role lands after sign-in: the screen of its main job (this table is the source). */
export const ROLE_HOME: Record<Role, string> = {
  admin: '/admin/users',
  supervisor: '/waves',
  engineer: '/studies',
  picker: '/pick',
};

export interface AccessMeta {
  /** Open without a session (sign-in, reset, invite pages). */
  public?: boolean;
  /** Signed-in users are sent on (to `next` or home) instead of seeing this page. */
  guestOnly?: boolean;
  /** Roles that may open the page; absent means every signed-in role. */
  roles?: readonly Role[];
  /** The bare `/` route: sends each role to its home. */
  roleHome?: boolean;
}

export interface Target {
  fullPath: string;
  query: Record<string, unknown>;
  meta: AccessMeta;
}

export type SignInMode = 'email' | 'badge';

export type Access = { kind: 'allow' } | { kind: 'not-allowed' } | { kind: 'redirect'; to: string };

export function isRoleAllowed(roles: readonly Role[] | undefined, role: Role): boolean {
  return roles === undefined || roles.includes(role);
}

/** Only same-app paths are followed after sign-in, so `?next=` cannot send anyone off-site. */
export function safeNext(next: unknown): string | null {
  if (typeof next !== 'string' || !next.startsWith('/') || next.startsWith('//') || next.startsWith('/\\')) return null;
  return next;
}

export function signInLocation(next: string, mode: SignInMode = 'email'): string {
  const base = mode === 'badge' ? '/sign-in/badge' : '/sign-in';
  return next === '/' || next === '' ? base : `${base}?next=${encodeURIComponent(next)}`;
}

/**
 * Where a user goes right after signing in: back to `next` when it is theirs to open, else home.
 * `rolesAt` tells which roles may open a path (the router knows); without it any safe path is followed.
 */
export function afterSignIn(role: Role, next: unknown, rolesAt?: (path: string) => readonly Role[] | undefined): string {
  const path = safeNext(next);
  if (path === null) return ROLE_HOME[role];
  if (rolesAt && !isRoleAllowed(rolesAt(path), role)) return ROLE_HOME[role];
  return path;
}

/**
 * The router guard's whole decision, free of Vue so it tests as a plain function.
 * `not-allowed` keeps the URL; the shell renders the NotAllowed page in place of the view.
 */
export function decideAccess(to: Target, role: Role | null, mode: SignInMode = 'email'): Access {
  if (to.meta.public) {
    if (to.meta.guestOnly && role !== null) return { kind: 'redirect', to: afterSignIn(role, to.query.next) };
    return { kind: 'allow' };
  }
  if (role === null) return { kind: 'redirect', to: signInLocation(to.fullPath, mode) };
  if (to.meta.roleHome) return { kind: 'redirect', to: ROLE_HOME[role] };
  return isRoleAllowed(to.meta.roles, role) ? { kind: 'allow' } : { kind: 'not-allowed' };
}
