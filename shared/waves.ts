import { z } from 'zod';

export const TOUR_METHOD_NAMES = ['best', 'repeated-nearest-neighbor', 'nearest-neighbor', 'sorted-edges', 'exact'] as const;
export const TourMethodName = z.enum(TOUR_METHOD_NAMES);
export const ImproveName = z.enum(['none', 'local', 'deep']);
export const BatchingName = z.enum(['single', 'fcfs', 'seed', 'savings', 'search']);
export type BatchingName = z.infer<typeof BatchingName>;

/** Labels shown in the UI, our own words beside the published method names. */
export const BATCHING_LABELS: Record<BatchingName, string> = {
  single: 'One order per trip',
  fcfs: 'First come, first served (FCFS)',
  seed: 'Seed batching',
  savings: 'Clarke–Wright savings',
  search: 'Searched batches (improves on savings)',
};
/** One line under the batching picker: what the chosen method does. */
export const BATCHING_HINTS: Record<BatchingName, string> = {
  single: 'Each order walks its own trip: the baseline the others are measured against.',
  fcfs: 'Orders in due-time order fill each cart until the next one does not fit.',
  seed: 'A far-flung order starts each cart; the orders adding least walking join it.',
  savings: 'Carts are merged pairwise where sharing a trip saves the most walking.',
  search: 'Starts from savings and keeps moving and swapping orders between carts while the time budget lasts; never more walking than savings.',
};
export const TOUR_METHOD_LABELS: Record<(typeof TOUR_METHOD_NAMES)[number], string> = {
  best: 'Best construction (repeated nearest neighbor or sorted edges)',
  'repeated-nearest-neighbor': 'Repeated nearest neighbor',
  'nearest-neighbor': 'Nearest neighbor',
  'sorted-edges': 'Sorted edges',
  exact: 'Exact (Held–Karp, up to 16 stops)',
};
export const IMPROVE_LABELS: Record<z.infer<typeof ImproveName>, string> = {
  none: 'No improvement',
  local: '2-opt + Or-opt to a local optimum',
  deep: 'Deep search (time-bounded)',
};

export const WavePreviewBody = z.strictObject({
  orderIds: z.array(z.number().int().positive()).min(1).max(3000),
  cartProfileId: z.number().int().positive(),
  batching: BatchingName.default('search'),
  method: TourMethodName.default('best'),
  improve: ImproveName.default('local'),
  /** Index of the plan's depot; default the first. */
  depot: z.number().int().min(0).default(0),
});
export type WavePreviewBody = z.infer<typeof WavePreviewBody>;

export const RoutePoint = z.tuple([z.number(), z.number()]);

export const PreviewStop = z.object({
  n: z.number().int(),
  node: z.number().int(),
  x: z.number(),
  y: z.number(),
  bins: z.array(z.string()),
  lines: z.number().int(),
});

export const PreviewTrip = z.object({
  n: z.number().int(),
  orders: z.array(z.object({ ref: z.string(), totes: z.array(z.number().int()) })),
  stops: z.array(PreviewStop),
  lines: z.number().int(),
  totes: z.number().int(),
  kg: z.number(),
  litres: z.number(),
  metres: z.number(),
  lowerBound: z.number(),
  aboveBoundPct: z.number(),
  sShapeMetres: z.number().nullable(),
  estMinutes: z.number(),
  /** The walked route from the depot and back, metres, for the map. */
  path: z.array(RoutePoint),
  depot: RoutePoint,
});
export type PreviewTrip = z.infer<typeof PreviewTrip>;

export const WaveTotalsView = z.object({
  trips: z.number().int(),
  orders: z.number().int(),
  lines: z.number().int(),
  metres: z.number(),
  lowerBound: z.number(),
  aboveBoundPct: z.number(),
  singleMetres: z.number(),
  savingVsSinglePct: z.number(),
  sShapeMetres: z.number().nullable(),
  savingVsSShapePct: z.number().nullable(),
  sShapeNote: z.string().nullable(),
  estMinutes: z.number(),
});

export const WavePreview = z.object({
  previewId: z.string(),
  planId: z.number().int(),
  planVersion: z.number().int(),
  cart: z.object({ id: z.number().int(), name: z.string(), totes: z.number().int(), maxKg: z.number(), maxLitres: z.number() }),
  batching: BatchingName,
  method: TourMethodName,
  improve: ImproveName,
  trips: z.array(PreviewTrip),
  totals: WaveTotalsView,
  unplaced: z.array(z.object({ order: z.string(), reason: z.string() })),
  notes: z.array(z.string()),
  ms: z.number(),
});
export type WavePreview = z.infer<typeof WavePreview>;

export const WaveJob = z.object({
  id: z.string(),
  state: z.enum(['running', 'done', 'failed']),
  /** 0…1 */
  progress: z.number(),
  phase: z.string(),
  error: z.object({ code: z.string(), message: z.string() }).nullable(),
  preview: WavePreview.nullable(),
});
export type WaveJob = z.infer<typeof WaveJob>;

export const ReleaseBody = z.strictObject({
  previewId: z.string().min(8).max(64),
  /** Made by the client once per release intent; a retry or double click sends the same key. */
  releaseKey: z.string().min(8).max(64),
  name: z.string().trim().min(1).max(80).optional(),
});

export const WaveStatus = z.enum(['released', 'picking', 'completed', 'cancelled']);
export const TripStatus = z.enum(['released', 'assigned', 'picking', 'done', 'cancelled']);
export type TripStatus = z.infer<typeof TripStatus>;

export const WaveSummary = z.object({
  id: z.number().int(),
  name: z.string(),
  status: WaveStatus,
  planId: z.number().int(),
  planVersion: z.number().int(),
  cartName: z.string(),
  batching: BatchingName,
  method: TourMethodName,
  improve: ImproveName,
  trips: z.number().int(),
  orders: z.number().int(),
  lines: z.number().int(),
  plannedMetres: z.number(),
  singleMetres: z.number(),
  sShapeMetres: z.number().nullable(),
  lowerBoundMetres: z.number(),
  estMinutes: z.number(),
  createdAt: z.string(),
  createdBy: z.string().nullable(),
  completedAt: z.string().nullable(),
});
export type WaveSummary = z.infer<typeof WaveSummary>;

export const TripSummary = z.object({
  id: z.number().int(),
  n: z.number().int(),
  status: TripStatus,
  pickerId: z.number().int().nullable(),
  pickerName: z.string().nullable(),
  orders: z.array(z.string()),
  stops: z.number().int(),
  lines: z.number().int(),
  plannedMetres: z.number(),
  lowerBoundMetres: z.number(),
  estMinutes: z.number(),
  totes: z.number().int(),
  kg: z.number(),
  litres: z.number(),
});
export type TripSummary = z.infer<typeof TripSummary>;

export const WaveDetail = WaveSummary.extend({ tripList: z.array(TripSummary), notes: z.array(z.string()) });
export type WaveDetail = z.infer<typeof WaveDetail>;

export const PickLineView = z.object({
  id: z.number().int(),
  orderRef: z.string(),
  sku: z.string(),
  description: z.string(),
  bin: z.string(),
  qty: z.number().int(),
  tote: z.number().int(),
  status: z.enum(['open', 'picked', 'short', 'cancelled']),
  pickedQty: z.number().int().nullable(),
  shortReason: z.string().nullable(),
});
export type PickLineView = z.infer<typeof PickLineView>;

export const StopView = z.object({
  id: z.number().int(),
  n: z.number().int(),
  x: z.number(),
  y: z.number(),
  bins: z.array(z.string()),
  status: z.enum(['open', 'done']),
  lines: z.array(PickLineView),
});
export type StopView = z.infer<typeof StopView>;

export const TripDetail = TripSummary.extend({
  waveId: z.number().int(),
  waveName: z.string(),
  planId: z.number().int(),
  siteName: z.string(),
  stopList: z.array(StopView),
  path: z.array(RoutePoint),
  depot: RoutePoint,
  depotCode: z.string(),
});
export type TripDetail = z.infer<typeof TripDetail>;

/** Planned against actual per trip (the wave report's figures): walked metres, minutes, shorts. */
export const WaveActualRow = z.object({
  trip: z.number().int(),
  status: z.string(),
  lines: z.number().int(),
  picked: z.number().int(),
  shorts: z.number().int(),
  plannedMetres: z.number().nullable(),
  /** Null until measurable (not started, or a closure cut off a stop after it was picked). */
  walkedMetres: z.number().nullable(),
  estMinutes: z.number().nullable(),
  /** Start to finish; null until the trip is finished. */
  minutes: z.number().nullable(),
});
export type WaveActualRow = z.infer<typeof WaveActualRow>;
export const WaveActuals = z.object({ rows: z.array(WaveActualRow) });
export type WaveActuals = z.infer<typeof WaveActuals>;
