import type { RouteRecordRaw } from 'vue-router';
import type { Role } from '@shared/common';
import type { AccessMeta } from './access';

export type MenuGroup = 'Floor' | 'Analysis' | 'Admin' | 'Records' | 'Picking';

declare module 'vue-router' {
  interface RouteMeta extends AccessMeta {
    /** Page title, also the document title. */
    title?: string;
    menu?: { label: string; group: MenuGroup };
    /** Screens not built yet show this line in a tidy empty state. */
    later?: string;
    /** Drawn without the app shell (printable pages). */
    bare?: boolean;
  }
}

const OFFICE: readonly Role[] = ['admin', 'supervisor', 'engineer'];
const later = () => import('@client/views/LaterReleaseView.vue');

/** Every screen in one flat table: path, name, who may open it, menu entry. */
export const routes: RouteRecordRaw[] = [
  { path: '/sign-in', name: 'sign-in', component: () => import('@client/views/SignInView.vue'), meta: { public: true, guestOnly: true, title: 'Sign in' } },
  {
    path: '/sign-in/badge',
    name: 'badge-sign-in',
    component: () => import('@client/views/BadgeSignInView.vue'),
    meta: { public: true, guestOnly: true, title: 'Picker sign-in' },
  },
  {
    path: '/forgot-password',
    name: 'forgot-password',
    component: () => import('@client/views/ForgotPasswordView.vue'),
    meta: { public: true, title: 'Forgot password' },
  },
  {
    path: '/reset-password',
    name: 'reset-password',
    component: () => import('@client/views/ResetPasswordView.vue'),
    meta: { public: true, title: 'Choose a new password' },
  },
  {
    path: '/accept-invite',
    name: 'accept-invite',
    component: () => import('@client/views/AcceptInviteView.vue'),
    meta: { public: true, title: 'Accept invitation' },
  },

  { path: '/', name: 'home', component: later, meta: { roleHome: true } },
  {
    path: '/account/password',
    name: 'change-password',
    component: () => import('@client/views/ChangePasswordView.vue'),
    meta: { roles: OFFICE, title: 'Change password' },
  },

  {
    path: '/pick',
    name: 'pick',
    component: () => import('@client/views/picking/PickTripView.vue'),
    meta: { roles: ['picker'], title: 'My trip', menu: { label: 'My trip', group: 'Picking' } },
  },

  {
    path: '/floor-plans',
    name: 'floor-plans',
    component: () => import('@client/views/floor-plans/FloorPlansView.vue'),
    meta: { roles: ['supervisor', 'engineer', 'admin'], title: 'Floor plans', menu: { label: 'Floor plans', group: 'Floor' } },
  },
  {
    path: '/floor-plans/:planId(\\d+)',
    name: 'floor-plan',
    component: () => import('@client/views/floor-plans/FloorPlanView.vue'),
    meta: { roles: ['supervisor', 'engineer', 'admin'], title: 'Floor plan' },
  },
  {
    path: '/orders',
    name: 'orders',
    component: () => import('@client/views/orders/OrdersView.vue'),
    meta: { roles: ['supervisor'], title: 'Orders', menu: { label: 'Orders', group: 'Floor' } },
  },
  { path: '/orders/:id(\\d+)', name: 'order', component: () => import('@client/views/orders/OrderView.vue'), meta: { roles: ['supervisor'], title: 'Order' } },
  { path: '/skus', name: 'skus', component: () => import('@client/views/orders/SkusView.vue'), meta: { roles: ['supervisor'], title: 'SKUs' } },
  {
    path: '/waves',
    name: 'waves',
    component: () => import('@client/views/waves/WavesView.vue'),
    meta: { roles: ['supervisor', 'engineer'], title: 'Waves', menu: { label: 'Waves', group: 'Floor' } },
  },
  {
    path: '/waves/new',
    name: 'wave-builder',
    component: () => import('@client/views/waves/WaveBuilderView.vue'),
    meta: { roles: ['supervisor'], title: 'Build a wave' },
  },
  {
    path: '/waves/:id(\\d+)',
    name: 'wave',
    component: () => import('@client/views/waves/WaveView.vue'),
    meta: { roles: ['supervisor', 'engineer'], title: 'Wave' },
  },
  {
    path: '/print/trips/:id(\\d+)',
    name: 'print-trip',
    component: () => import('@client/views/waves/PrintTripsView.vue'),
    meta: { roles: ['supervisor', 'engineer'], title: 'Pick list', bare: true },
  },
  {
    path: '/print/waves/:id(\\d+)',
    name: 'print-wave',
    component: () => import('@client/views/waves/PrintTripsView.vue'),
    meta: { roles: ['supervisor', 'engineer'], title: 'Pick lists', bare: true },
  },
  {
    path: '/live',
    name: 'live-board',
    component: () => import('@client/views/board/LiveBoardView.vue'),
    meta: { roles: ['supervisor', 'admin'], title: 'Live board', menu: { label: 'Live board', group: 'Floor' } },
  },
  {
    path: '/replenishment',
    name: 'replenishment',
    component: () => import('@client/views/board/ReplenishmentView.vue'),
    meta: { roles: ['supervisor', 'admin'], title: 'Replenishment list', menu: { label: 'Replenishment', group: 'Floor' } },
  },
  {
    path: '/studies',
    name: 'studies',
    component: () => import('@client/views/studies/StudiesView.vue'),
    meta: { roles: ['engineer', 'supervisor'], title: 'Studies', menu: { label: 'Studies', group: 'Analysis' } },
  },
  {
    path: '/studies/new',
    name: 'study-new',
    component: () => import('@client/views/studies/StudyNewView.vue'),
    meta: { roles: ['engineer', 'supervisor'], title: 'New study' },
  },
  {
    path: '/studies/:id(\\d+)',
    name: 'study',
    component: () => import('@client/views/studies/StudyView.vue'),
    meta: { roles: ['engineer', 'supervisor'], title: 'Study' },
  },
  {
    path: '/print/studies/:id(\\d+)',
    name: 'print-study',
    component: () => import('@client/views/studies/StudySummaryPrint.vue'),
    meta: { roles: ['engineer', 'supervisor'], title: 'Study summary', bare: true },
  },
  {
    path: '/slotting',
    name: 'slotting',
    component: () => import('@client/views/slotting/SlottingView.vue'),
    meta: { roles: ['engineer', 'supervisor'], title: 'Slotting', menu: { label: 'Slotting', group: 'Analysis' } },
  },
  {
    path: '/slotting/:id(\\d+)',
    name: 'slotting-run',
    component: () => import('@client/views/slotting/SlottingRunView.vue'),
    meta: { roles: ['engineer', 'supervisor', 'admin'], title: 'Slotting run' },
  },

  {
    path: '/admin/users',
    name: 'admin-users',
    component: () => import('@client/views/AdminUsersView.vue'),
    meta: { roles: ['admin'], title: 'Users', menu: { label: 'Users', group: 'Admin' } },
  },
  {
    path: '/admin/sites',
    name: 'admin-sites',
    component: () => import('@client/views/AdminSitesView.vue'),
    meta: { roles: ['admin'], title: 'Sites & settings', menu: { label: 'Sites & settings', group: 'Admin' } },
  },
  {
    path: '/admin/backups',
    name: 'admin-backups',
    component: () => import('@client/views/AdminBackupsView.vue'),
    meta: { roles: ['admin'], title: 'Backups', menu: { label: 'Backups', group: 'Admin' } },
  },
  {
    path: '/audit-log',
    name: 'audit-log',
    component: () => import('@client/views/AuditLogView.vue'),
    meta: { roles: ['admin', 'supervisor'], title: 'Audit log', menu: { label: 'Audit log', group: 'Records' } },
  },
  {
    path: '/exports',
    name: 'exports',
    component: () => import('@client/views/DataExportsView.vue'),
    meta: { roles: ['admin', 'supervisor'], title: 'Exports', menu: { label: 'Exports', group: 'Records' } },
  },
  {
    path: '/admin/outbox',
    name: 'admin-outbox',
    component: () => import('@client/views/AdminOutboxView.vue'),
    meta: { roles: ['admin'], title: 'Mail outbox', menu: { label: 'Mail outbox', group: 'Admin' } },
  },

  { path: '/:pathMatch(.*)*', name: 'not-found', component: () => import('@client/views/NotFoundView.vue'), meta: { title: 'Page not found' } },
];

export interface MenuEntry {
  name: string;
  path: string;
  label: string;
  group: MenuGroup;
}

/** The side menu for one role: only the screens that role may open, in table order. */
export function menuFor(role: Role, table: readonly RouteRecordRaw[] = routes): MenuEntry[] {
  const entries: MenuEntry[] = [];
  for (const route of table) {
    const menu = route.meta?.menu;
    const roles = route.meta?.roles;
    if (!menu || typeof route.name !== 'string') continue;
    if (roles !== undefined && !roles.includes(role)) continue;
    entries.push({ name: route.name, path: route.path, label: menu.label, group: menu.group });
  }
  return entries;
}
