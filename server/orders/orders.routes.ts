import { z } from 'zod';
import { ImportResult, OrderDetail, OrdersPage, OrdersQuery, PushOrdersBody, Sku } from '../../shared/orders';
import { notFound } from '../http/errors';
import { defineRoute } from '../http/route';
import { orderDetail, pageOrders, skuMap } from './orders.repository';
import { pushOrders } from './orders.service';
import { missingBinsOnActivePlan } from './bins';

export const orderRoutes = [
  defineRoute({
    method: 'get', path: '/api/sites/:siteId/orders', access: ['supervisor', 'admin', 'engineer'], summary: 'Orders, server-paged, sortable and filterable',
    query: OrdersQuery, response: OrdersPage,
    handler: ({ deps, siteId, query }) => pageOrders(deps.db, siteId!, query),
  }),
  defineRoute({
    method: 'get', path: '/api/sites/:siteId/orders/:id', access: ['supervisor', 'admin', 'engineer'], summary: 'One order with its lines',
    response: OrderDetail,
    handler: async ({ deps, siteId, params }) => (await orderDetail(deps.db, siteId!, Number(params.id))) ?? Promise.reject(notFound('Order')),
  }),
  defineRoute({
    method: 'post', path: '/api/sites/:siteId/orders/push', access: 'integration', summary: "The host system pushes orders (integration token for this site); re-sent references are not duplicated",
    body: PushOrdersBody, response: ImportResult,
    handler: ({ deps, siteId, body }) => pushOrders(deps.db, siteId!, body.orders),
  }),
  defineRoute({
    method: 'get', path: '/api/sites/:siteId/skus', access: ['supervisor', 'admin', 'engineer'], summary: 'The SKU master, with bins missing from the active plan flagged',
    response: z.array(Sku),
    handler: async ({ deps, siteId }) => {
      const skus = [...(await skuMap(deps.db, siteId!)).values()];
      const missing = await missingBinsOnActivePlan(deps.db, siteId!, skus.map((s) => s.bin));
      return skus
        .sort((a, b) => a.sku.localeCompare(b.sku))
        .map((s) => ({ sku: s.sku, description: s.description, bin: s.bin, unitWeightKg: s.unit_weight_kg, unitVolumeL: s.unit_volume_l, binOnActivePlan: !missing.has(s.bin) }));
    },
  }),
];
