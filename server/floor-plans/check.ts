/**
 * The import library's entry point (server/floor-plans/import/, the import engineer's), typed as
 * FLOOR-PLANS.md states it and loaded on first use.
 */
import type { RowIssue } from '../../shared/imports';
import type { PlanGeometry } from '../core/plan/types';

export interface FloorPlanCheckResult {
  ok: boolean;
  errors: RowIssue[];
  warnings: RowIssue[];
  stats: { aisles: number; crossAisles: number; bins: number; accessPoints: number; depots: number; totalAisleLengthM: number };
  plan: PlanGeometry | null;
}

export interface CheckOptions {
  onProgress?: (p: { phase: 'parsing' | 'checking'; fraction: number }) => void;
  timeoutMs?: number;
}

interface ImportModule {
  checkFloorPlanFile(bytes: Uint8Array, filename: string, options?: CheckOptions): Promise<FloorPlanCheckResult>;
  buildFloorPlanTemplate(): Buffer;
  rowIssuesToXlsx(issues: RowIssue[]): Buffer;
  rowIssuesToCsv(issues: RowIssue[]): string;
}

const load = (): Promise<ImportModule> => import('./import/index') as Promise<ImportModule>;

export async function checkFloorPlanFile(bytes: Uint8Array, filename: string, options?: CheckOptions): Promise<FloorPlanCheckResult> {
  return (await load()).checkFloorPlanFile(bytes, filename, options);
}
export async function floorPlanTemplate(): Promise<Buffer> {
  return (await load()).buildFloorPlanTemplate();
}
export async function issuesXlsx(issues: RowIssue[]): Promise<Buffer> {
  return (await load()).rowIssuesToXlsx(issues);
}
export async function issuesCsv(issues: RowIssue[]): Promise<string> {
  return (await load()).rowIssuesToCsv(issues);
}
