/**
 * Slotting's files: the new SKU master in the import format (`sku`, `description`, `bin`,
 * `unit_weight_kg`, `unit_volume_l` on a `skus` sheet, so it imports as it is) and the move list.
 */
import * as XLSX from 'xlsx';
import type { SlotMove } from '../core/slotting/types';
import { SKU_COLUMNS, type SkuRecord } from '../orders/orders.validate';

/** The SKU master with every SKU's bin after slotting (SKUs the result does not name keep theirs). */
export function newSkuMasterWorkbook(records: readonly SkuRecord[], assignment: ReadonlyMap<string, string>): Buffer {
  const wb = XLSX.utils.book_new();
  const rows = records.map((r) => [r.sku, r.description, assignment.get(r.sku) ?? r.bin, r.unitWeightKg, r.unitVolumeL]);
  XLSX.utils.book_append_sheet(wb, XLSX.utils.aoa_to_sheet([[...SKU_COLUMNS], ...rows]), 'skus');
  return XLSX.write(wb, { type: 'buffer', bookType: 'xlsx' }) as Buffer;
}

/** The move list, most walking saved first: one row per SKU that changes bin. */
export function moveListWorkbook(moves: readonly SlotMove[]): Buffer {
  const wb = XLSX.utils.book_new();
  const rows = moves.map((m) => [m.sku, m.fromBin ?? '', m.toBin, Math.round(m.picksPerDay * 100) / 100, Math.round(m.estSavingMPerDay * 10) / 10]);
  XLSX.utils.book_append_sheet(wb, XLSX.utils.aoa_to_sheet([['sku', 'from_bin', 'to_bin', 'picks_per_day', 'est_saving_m_per_day'], ...rows]), 'moves');
  return XLSX.write(wb, { type: 'buffer', bookType: 'xlsx' }) as Buffer;
}
