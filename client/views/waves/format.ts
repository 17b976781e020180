import { distance, NBSP } from '@client/utils/format';

/** Numbers always carry units; a figure never wraps away from its unit. */
export const metres = (m: number): string => distance(m);
export const minutes = (min: number): string =>
  min >= 90 ? `${Math.floor(min / 60)}${NBSP}h ${Math.round(min % 60)}${NBSP}min` : `${Math.round(min)}${NBSP}min`;
export const percent = (p: number): string => `${p.toFixed(1)}${NBSP}%`;
export { distances } from '@client/utils/format';
