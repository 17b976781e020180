/**
 * Slotting runs: where each SKU should live, learnt from the site's order history and measured with the
 * same batching and routing before and after. One schema per shape, for server and client.
 */
import { z } from 'zod';

export const SLOTTING_METHOD_NAMES = ['popularity', 'cube-per-order', 'search'] as const;
export const SlottingMethodName = z.enum(SLOTTING_METHOD_NAMES);
export type SlottingMethodName = z.infer<typeof SlottingMethodName>;

/** Each method with its published source, shown beside its name. */
export const SLOTTING_METHOD_LABELS: Record<SlottingMethodName, { label: string; about: string }> = {
  popularity: {
    label: 'Popularity by distance',
    about: 'The SKUs picked most often go to the bins with the shortest walk from the depot (class-based storage, Hausman, Schwarz & Graves 1976).',
  },
  'cube-per-order': {
    label: 'Cube-per-order index',
    about: 'Unit volume over picks: small, often-picked SKUs nearest the depot (Heskett 1963).',
  },
  search: {
    label: 'Search on your orders',
    about:
      'Starts from the better of the two rules and moves or swaps SKUs so the trips your orders need get shorter, e.g. SKUs often ordered together end up near each other.',
  },
};

const IsoDay = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'a date such as 2026-11-30');

export const SlottingHistory = z.discriminatedUnion('kind', [
  /** Lines picked on the site's tablets between two dates (inclusive). */
  z.strictObject({ kind: z.literal('recorded'), from: IsoDay, to: IsoDay }),
  /** An uploaded order file (see `POST …/slotting/histories`). */
  z.strictObject({ kind: z.literal('upload'), historyId: z.number().int().positive() }),
]);
export type SlottingHistory = z.infer<typeof SlottingHistory>;

export const SlottingInputs = z.strictObject({
  name: z.string().trim().min(1).max(120),
  method: SlottingMethodName,
  history: SlottingHistory,
  /** Most SKUs that may change bin (a swap is two); null: no limit. */
  maxMoves: z.number().int().min(0).max(100_000).nullable().default(null),
  /** Bins of these zones, and these bins, stay as they are. */
  pinnedZones: z.array(z.string().trim().min(1).max(40)).max(100).default([]),
  pinnedBins: z.array(z.string().trim().min(1).max(64)).max(10_000).default([]),
  /** Heavy items on low levels; null: no rule. */
  weightRule: z
    .strictObject({ minUnitKg: z.number().positive().max(1000), maxLevel: z.number().int().min(1).max(50) })
    .nullable()
    .default(null),
  /** Share of the history's days learnt from (the earliest); the rest measure the saving honestly. */
  learnShare: z
    .number()
    .gt(0)
    .max(1)
    .default(2 / 3),
  cartProfileId: z.number().int().positive(),
  /** A stored plan of the site (draft, active or retired) to slot on; null: the active plan. Moves apply only on the active plan. */
  planId: z.number().int().positive().nullable().default(null),
});
export type SlottingInputs = z.infer<typeof SlottingInputs>;
export type SlottingInputsBody = z.input<typeof SlottingInputs>;

export const SlottingPeriod = z.object({
  days: z.number().int(),
  orders: z.number().int(),
  metresBefore: z.number(),
  metresAfter: z.number(),
  savingPct: z.number(),
  pickerHoursPerDay: z.number(),
});
export type SlottingPeriod = z.infer<typeof SlottingPeriod>;

export const SlottingMove = z.object({
  sku: z.string(),
  fromBin: z.string().nullable(),
  toBin: z.string(),
  picksPerDay: z.number(),
  estSavingMPerDay: z.number(),
});
export type SlottingMove = z.infer<typeof SlottingMove>;

export const SlottingResults = z.object({
  planId: z.number().int(),
  figures: z.object({ learn: SlottingPeriod, test: SlottingPeriod, whole: SlottingPeriod }),
  moves: z.array(SlottingMove),
  /** Picks per bin over the whole history, today and after the moves (bins with none left out). */
  heat: z.object({ before: z.record(z.string(), z.number()), after: z.record(z.string(), z.number()) }),
  notes: z.array(z.string()),
  walkingMps: z.number(),
  ms: z.number(),
});
export type SlottingResults = z.infer<typeof SlottingResults>;

export const SLOTTING_STATUSES = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export const SlottingStatus = z.enum(SLOTTING_STATUSES);

export const SlottingRunSummary = z.object({
  id: z.number().int(),
  name: z.string(),
  method: SlottingMethodName,
  status: SlottingStatus,
  progress: z.number(),
  error: z.string().nullable(),
  createdBy: z.string().nullable(),
  createdAt: z.string(),
  finishedAt: z.string().nullable(),
  /** Moves applied to the SKU master, and when; null until applied. */
  appliedMoves: z.number().int().nullable(),
  appliedAt: z.string().nullable(),
});
export type SlottingRunSummary = z.infer<typeof SlottingRunSummary>;

export const SlottingRunDetail = SlottingRunSummary.extend({
  inputs: SlottingInputs,
  results: SlottingResults.nullable(),
});
export type SlottingRunDetail = z.infer<typeof SlottingRunDetail>;

export const SlottingHistoryUpload = z.object({
  historyId: z.number().int(),
  orders: z.number().int(),
  lines: z.number().int(),
  days: z.number().int(),
  firstDay: z.string().nullable(),
  lastDay: z.string().nullable(),
});
export type SlottingHistoryUpload = z.infer<typeof SlottingHistoryUpload>;

/** Apply all moves, or the chosen SKUs' moves. */
export const SlottingApplyBody = z.strictObject({ skus: z.array(z.string().min(1).max(64)).max(100_000).nullable().default(null) });
export type SlottingApplyBody = z.input<typeof SlottingApplyBody>;

export const SlottingApplyResult = z.object({ applied: z.number().int(), skipped: z.array(z.object({ sku: z.string(), reason: z.string() })) });
export type SlottingApplyResult = z.infer<typeof SlottingApplyResult>;
