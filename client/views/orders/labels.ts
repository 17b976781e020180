import type { OrderStatus } from '@shared/orders';

export const ORDER_STATUS_LABEL: Record<OrderStatus, string> = {
  open: 'Open',
  planned: 'In a wave',
  picking: 'Being picked',
  done: 'Picked',
  cancelled: 'Cancelled',
};
