import { ImportResult, OrderDetail, OrdersPage, Sku, type OrdersQuery } from '@shared/orders';
import { http } from './http';
import { uploadFile } from './upload';

const base = (siteId: number) => `/api/sites/${siteId}`;

export function listOrders(siteId: number, q: Partial<OrdersQuery>) {
  const params = new URLSearchParams();
  for (const [k, v] of Object.entries(q)) if (v !== undefined && v !== '' && v !== null) params.set(k, String(v));
  return http('GET', `${base(siteId)}/orders?${params}`, OrdersPage);
}

export const getOrder = (siteId: number, id: number) => http('GET', `${base(siteId)}/orders/${id}`, OrderDetail);
export const listSkus = (siteId: number) => http('GET', `${base(siteId)}/skus`, Sku.array());
export const importSkus = (siteId: number, file: File, onProgress?: (f: number) => void) =>
  uploadFile(`${base(siteId)}/skus/import`, file, file.name, ImportResult, onProgress);
export const importOrders = (siteId: number, file: File, onProgress?: (f: number) => void) =>
  uploadFile(`${base(siteId)}/orders/import`, file, file.name, ImportResult, onProgress);

export const SKU_TEMPLATE_URL = '/api/templates/skus.xlsx';
export const ORDER_TEMPLATE_URL = '/api/templates/orders.xlsx';
export const cancelOrder = (siteId: number, id: number, reason?: string) =>
  http('POST', `${base(siteId)}/orders/${id}/cancel`, OrderDetail, { body: reason ? { reason } : {} });
