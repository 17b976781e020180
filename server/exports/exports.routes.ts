import type { Role } from '../../shared/common';
import { ExportQuery } from '../../shared/data-safety';
import { audit } from '../audit/audit';
import { notFound } from '../http/errors';
import type { Q } from '../db/knex';
import { defineRoute } from '../http/route';
import { siteCodeOf } from '../sites/sites.repository';
import { ordersTable, pickLinesTable, siteDataTables, usersTable } from './site-exports';
import { exportTable, sendExport, tablesToXlsx, XLSX_TYPE } from './table-export';

const SUPERVISE: readonly Role[] = ['admin', 'supervisor'];
const stamp = () => new Date().toISOString().slice(0, 10);

async function siteCode(db: Q, siteId: number): Promise<string> {
  return (await siteCodeOf(db, siteId)) ?? Promise.reject(notFound('Site'));
}

const KINDS = {
  orders: ordersTable,
  'pick-lines': pickLinesTable,
  users: usersTable,
} as const;

export const exportRoutes = [
  ...Object.entries(KINDS).map(([kind, table]) =>
    defineRoute({
      method: 'get',
      path: `/api/sites/:siteId/exports/${kind}`,
      access: SUPERVISE,
      summary: `Download the site's ${kind.replace('-', ' ')} as xlsx or CSV`,
      query: ExportQuery,
      handler: async ({ deps, siteId, query, res, user }) => {
        const code = await siteCode(deps.db, siteId);
        const file = exportTable(await table(deps.db, siteId), query.format, `${kind}-${code}-${stamp()}`);
        await audit(deps.db, { siteId, userId: user.id, action: 'export.downloaded', subject: kind, detail: { format: query.format } });
        return sendExport(res, file);
      },
    }),
  ),
  defineRoute({
    method: 'get',
    path: '/api/sites/:siteId/exports/site-data',
    access: SUPERVISE,
    summary: 'Everything of the site as one workbook, a sheet per table (no secrets, no binary data)',
    handler: async ({ deps, siteId, res, user }) => {
      const code = await siteCode(deps.db, siteId);
      const body = tablesToXlsx(await siteDataTables(deps.db, siteId));
      await audit(deps.db, { siteId, userId: user.id, action: 'export.downloaded', subject: 'site-data', detail: { format: 'xlsx' } });
      return sendExport(res, { filename: `site-data-${code}-${stamp()}.xlsx`, contentType: XLSX_TYPE, body });
    },
  }),
];
