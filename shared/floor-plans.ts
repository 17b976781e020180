/**
 * Floor-plan shapes shared by client and server: the geometry as the engine sees it and the answer of
 * a floor-plan file check. Mirrors server/core/plan/types.ts (the import checks the two agree).
 */
import { z } from 'zod';
import { RowIssue } from './imports';

export const PlanAisle = z.object({ code: z.string(), x: z.number(), yStart: z.number(), yEnd: z.number() });
export type PlanAisle = z.infer<typeof PlanAisle>;

export const PlanCrossAisle = z.object({ code: z.string(), y: z.number(), xStart: z.number(), xEnd: z.number() });
export type PlanCrossAisle = z.infer<typeof PlanCrossAisle>;

export const PlanBin = z.object({
  code: z.string(),
  aisle: z.string(),
  /** Metres along the aisle centre line (the bay centre when the sheet gave a bay). */
  y: z.number(),
  bay: z.number().int().nullable(),
  side: z.enum(['L', 'R']),
  level: z.number().int(),
  zone: z.string().nullable(),
});
export type PlanBin = z.infer<typeof PlanBin>;

export const PlanDepot = z.object({ code: z.string(), x: z.number(), y: z.number() });
export type PlanDepot = z.infer<typeof PlanDepot>;

export const PlanGeometry = z.object({
  aisles: z.array(PlanAisle),
  crossAisles: z.array(PlanCrossAisle),
  bins: z.array(PlanBin),
  depots: z.array(PlanDepot),
});
export type PlanGeometry = z.infer<typeof PlanGeometry>;

/** Counts of a checked plan; lengths in metres. Counted over the rows that passed, also when others failed. */
export const FloorPlanStats = z.object({
  aisles: z.number().int().nonnegative(),
  crossAisles: z.number().int().nonnegative(),
  bins: z.number().int().nonnegative(),
  /** Distinct access points on aisle centre lines (bins of one bay, both sides, share one). */
  accessPoints: z.number().int().nonnegative(),
  depots: z.number().int().nonnegative(),
  /** Sum of the aisles' centre-line lengths, metres. */
  totalAisleLengthM: z.number().nonnegative(),
});
export type FloorPlanStats = z.infer<typeof FloorPlanStats>;

/** The answer of checking a floor-plan file; `plan` is null whenever there is an error. */
export const FloorPlanCheck = z.object({
  ok: z.boolean(),
  errors: z.array(RowIssue),
  warnings: z.array(RowIssue),
  stats: FloorPlanStats,
  plan: PlanGeometry.nullable(),
});
export type FloorPlanCheck = z.infer<typeof FloorPlanCheck>;

/** Progress of a check: reading the file, then checking its rows and geometry; fraction 0–1 per phase. */
export const FloorPlanCheckProgress = z.object({
  phase: z.enum(['parsing', 'checking']),
  fraction: z.number().min(0).max(1),
});
export type FloorPlanCheckProgress = z.infer<typeof FloorPlanCheckProgress>;
