import { z } from 'zod';
import {
  AuditPage,
  BackupItem,
  BackupsStatus,
  PruneCounts,
  RetentionState,
  type AuditFilter,
  type ExportFormat,
  type RetentionSettings,
} from '@shared/data-safety';
import { IntegrationToken, NewIntegrationToken } from '@shared/sites';
import { http } from './http';

export const getBackups = () => http('GET', '/api/admin/backups', BackupsStatus);
export const backUpNow = () => http('POST', '/api/admin/backups', BackupItem, { body: {} });
export const backupDownloadUrl = (name: string) => `/api/admin/backups/${encodeURIComponent(name)}`;

export const getRetention = () => http('GET', '/api/admin/retention', RetentionState);
export const saveRetention = (body: Partial<RetentionSettings>) => http('PUT', '/api/admin/retention', RetentionState, { body });
export const pruneNow = () => http('POST', '/api/admin/retention/prune', PruneCounts, { body: {} });

/** `siteId` null: an admin's view over every site (and account events with no site). */
function auditQuery(filter: AuditFilter, extra: Record<string, string | number>): string {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries({ ...filter, ...extra })) if (v !== undefined && v !== '') q.set(k, String(v));
  return q.toString();
}
export const getAuditLog = (siteId: number | null, filter: AuditFilter, page: number, pageSize: number) =>
  http('GET', `${siteId === null ? '/api/audit-log' : `/api/sites/${siteId}/audit-log`}?${auditQuery(filter, { page, pageSize })}`, AuditPage);
export const auditExportUrl = (siteId: number | null, filter: AuditFilter, format: ExportFormat) =>
  `${siteId === null ? '/api/audit-log/export' : `/api/sites/${siteId}/audit-log/export`}?${auditQuery(filter, { format })}`;

export const exportUrl = (siteId: number, kind: 'orders' | 'pick-lines' | 'users' | 'site-data', format: ExportFormat = 'xlsx') =>
  kind === 'site-data' ? `/api/sites/${siteId}/exports/site-data` : `/api/sites/${siteId}/exports/${kind}?format=${format}`;

export const listTokens = (siteId: number) => http('GET', `/api/sites/${siteId}/integration-tokens`, z.array(IntegrationToken));
export const createToken = (siteId: number, body: { name: string; expiresAt?: string }) =>
  http('POST', `/api/sites/${siteId}/integration-tokens`, NewIntegrationToken, { body });
export const revokeToken = (siteId: number, id: number) => http('DELETE', `/api/sites/${siteId}/integration-tokens/${id}`, IntegrationToken);
