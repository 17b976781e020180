import { z } from 'zod';
import { CancelOrderBody, ImportResult, OrderDetail, OrdersPage, OrdersQuery, PushOrdersBody, Sku } from '../../shared/orders';
import { notFound } from '../http/errors';
import { pathId } from '../http/path-id';
import { sendAttachment, XLSX_TYPE } from '../http/attachment';
import { defineRoute, officeRead } from '../http/route';
import { orderDetail, pageOrders, skuMap } from './orders.repository';
import { cancelOrder, importOrderRows, importSkus, pushOrders } from './orders.service';
import { failed, orderTemplate, readTableFile, skuTemplate } from './orders.files';
import { AppError } from '../http/errors';
import type { Request, Response } from 'express';
import type { ImportResult as ImportResultT } from '../../shared/orders';
import type { InputRow } from './orders.validate';
import { missingBinsOnActivePlan } from '../floor-plans/floor-plans.repository';

const uploaded = (req: Request) => {
  const file = req.file;
  if (!file) throw new AppError('validation', 'validation_failed', 'Attach the file in the field "file"', [{ field: 'file', message: 'missing' }]);
  return file;
};

/** Reads the uploaded SKU or order file in a worker; its rows go to `save`, or its reading issues come back. */
async function importUpload(req: Request, which: 'skus' | 'orders', save: (rows: InputRow[]) => Promise<ImportResultT>): Promise<ImportResultT> {
  const file = uploaded(req);
  const read = await readTableFile(file.buffer, file.originalname, which);
  return 'issues' in read ? failed(read.issues) : save(read.rows);
}

const sendXlsx = (res: Response, name: string, bytes: Buffer) => sendAttachment(res, bytes, XLSX_TYPE, name);

export const orderRoutes = [
  defineRoute({
    method: 'post',
    path: '/api/sites/:siteId/skus/import',
    access: ['supervisor', 'admin'],
    summary: 'Import the SKU master (xlsx sheet "skus" or CSV); any error → nothing saved',
    upload: 'single-file',
    response: ImportResult,
    handler: ({ deps, siteId, req, user }) =>
      importUpload(req, 'skus', (rows) => importSkus(deps.db, siteId, user.id, 'skus', rows, (bins) => missingBinsOnActivePlan(deps.db, siteId, bins))),
  }),
  defineRoute({
    method: 'post',
    path: '/api/sites/:siteId/orders/import',
    access: ['supervisor', 'admin'],
    summary: 'Import orders (xlsx sheet "orders" or CSV); any error → nothing saved',
    upload: 'single-file',
    response: ImportResult,
    handler: ({ deps, siteId, req, user }) => importUpload(req, 'orders', (rows) => importOrderRows(deps.db, siteId, user.id, 'orders', rows, 'upload')),
  }),
  defineRoute({
    method: 'get',
    path: '/api/templates/skus.xlsx',
    access: 'signed-in',
    summary: 'SKU master template with a worked example',
    handler: ({ res }) => sendXlsx(res, 'aislewright-skus-template.xlsx', skuTemplate()),
  }),
  defineRoute({
    method: 'get',
    path: '/api/templates/orders.xlsx',
    access: 'signed-in',
    summary: 'Order file template with a worked example',
    handler: ({ res }) => sendXlsx(res, 'aislewright-orders-template.xlsx', orderTemplate()),
  }),
  officeRead({
    path: '/api/sites/:siteId/orders',
    summary: 'Orders, server-paged, sortable and filterable',
    query: OrdersQuery,
    response: OrdersPage,
    handler: ({ deps, siteId, query }) => pageOrders(deps.db, siteId, query),
  }),
  officeRead({
    path: '/api/sites/:siteId/orders/:id',
    summary: 'One order with its lines',
    response: OrderDetail,
    handler: async ({ deps, siteId, params }) => (await orderDetail(deps.db, siteId, pathId(params.id, 'Order'))) ?? Promise.reject(notFound('Order')),
  }),
  defineRoute({
    method: 'post',
    path: '/api/sites/:siteId/orders/:id/cancel',
    access: ['supervisor', 'admin'],
    summary: 'Cancel an open order (409 order_not_open for one in a wave, being picked or done); audited',
    body: CancelOrderBody,
    response: OrderDetail,
    handler: async ({ deps, siteId, params, body, user }) => {
      await cancelOrder(deps.db, siteId, user.id, pathId(params.id, 'Order'), body.reason);
      return (await orderDetail(deps.db, siteId, pathId(params.id, 'Order')))!;
    },
  }),
  defineRoute({
    method: 'post',
    path: '/api/sites/:siteId/orders/push',
    access: 'integration',
    summary:
      'The host system pushes orders (integration token for this site); re-sent references are not duplicated. All or nothing: 400 duplicate_order, 422 unknown_sku / orders_invalid, 409 order_released (the order is in a released wave; details name the order, field and wave)',
    body: PushOrdersBody,
    response: ImportResult,
    handler: ({ deps, siteId, body }) => pushOrders(deps.db, siteId, body.orders),
  }),
  officeRead({
    path: '/api/sites/:siteId/skus',
    summary: 'The SKU master, with bins missing from the active plan flagged',
    response: z.array(Sku),
    handler: async ({ deps, siteId }) => {
      const skus = [...(await skuMap(deps.db, siteId)).values()];
      const missing = await missingBinsOnActivePlan(
        deps.db,
        siteId,
        skus.map((s) => s.bin),
      );
      return skus
        .sort((a, b) => a.sku.localeCompare(b.sku))
        .map((s) => ({
          sku: s.sku,
          description: s.description,
          bin: s.bin,
          unitWeightKg: s.unit_weight_kg,
          unitVolumeL: s.unit_volume_l,
          binOnActivePlan: !missing.has(s.bin),
        }));
    },
  }),
];
