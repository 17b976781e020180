import { AllAuditExportQuery, AllAuditQuery, AuditExportQuery, AuditPage, AuditQuery } from '../../shared/data-safety';
import type { Role } from '../../shared/common';
import { exportTable, sendExport } from '../exports/table-export';
import { defineRoute } from '../http/route';
import { siteCodeOf } from '../sites/sites.repository';
import { auditPage, auditTable } from './audit-log.repository';

const SUPERVISE: readonly Role[] = ['admin', 'supervisor'];
const stamp = () => new Date().toISOString().slice(0, 10);

export const auditRoutes = [
  defineRoute({
    method: 'get',
    path: '/api/sites/:siteId/audit-log',
    access: SUPERVISE,
    summary: "A site's audit log, newest first: filter by person, action, dates; paged",
    query: AuditQuery,
    response: AuditPage,
    handler: ({ deps, siteId, query }) => {
      const { page, pageSize, ...filter } = query;
      return auditPage(deps.db, { site: siteId }, filter, page, pageSize);
    },
  }),
  defineRoute({
    method: 'get',
    path: '/api/sites/:siteId/audit-log/export',
    access: SUPERVISE,
    summary: "A site's audit log as xlsx or CSV, same filters",
    query: AuditExportQuery,
    handler: async ({ deps, siteId, query, res }) => {
      const { format, ...filter } = query;
      const code = (await siteCodeOf(deps.db, siteId)) ?? siteId;
      return sendExport(res, exportTable(await auditTable(deps.db, { site: siteId }, filter), format, `audit-log-${code}-${stamp()}`));
    },
  }),
  defineRoute({
    method: 'get',
    path: '/api/audit-log',
    access: ['admin'],
    summary: 'Audit log over every site, and account events that belong to no site (admins)',
    query: AllAuditQuery,
    response: AuditPage,
    handler: ({ deps, query }) => {
      const { page, pageSize, siteId, ...filter } = query;
      return auditPage(deps.db, siteId ? { site: siteId } : 'all', filter, page, pageSize);
    },
  }),
  defineRoute({
    method: 'get',
    path: '/api/audit-log/export',
    access: ['admin'],
    summary: 'The whole audit log (or one site) as xlsx or CSV (admins)',
    query: AllAuditExportQuery,
    handler: async ({ deps, query, res }) => {
      const { format, siteId, ...filter } = query;
      return sendExport(res, exportTable(await auditTable(deps.db, siteId ? { site: siteId } : 'all', filter), format, `audit-log-all-${stamp()}`));
    },
  }),
];
