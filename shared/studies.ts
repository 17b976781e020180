/**
 * Studies: an engineer's saved comparison of routing and batching methods on recorded waves or a
 * generated scenario, on the plan as it is and on what-if changes of it. One schema per shape, used by
 * the server to validate and by the client to parse.
 */
import { z } from 'zod';
import { FloorPlanStats, GeneratePlanParams } from './floor-plans';
import { RowIssue } from './imports';
import { BatchingName } from './waves';

/**
 * Every routing method a study can compare. Tour methods are `<construction>+<improvement>` on the
 * shortest walking distances; the rest are the warehouse routing policies and the two exact methods.
 */
export const ROUTING_METHOD_KEYS = [
  'nearest-neighbor+none',
  'nearest-neighbor+local',
  'nearest-neighbor+deep',
  'repeated-nearest-neighbor+none',
  'repeated-nearest-neighbor+local',
  'repeated-nearest-neighbor+deep',
  'sorted-edges+none',
  'sorted-edges+local',
  'sorted-edges+deep',
  'best+none',
  'best+local',
  'best+deep',
  'exact',
  's-shape',
  'return',
  'midpoint',
  'largest-gap',
  'combined',
  'ratliff-rosenthal',
] as const;
export const RoutingMethodKey = z.enum(ROUTING_METHOD_KEYS);
export type RoutingMethodKey = z.infer<typeof RoutingMethodKey>;

/** What a wave is routed with unless someone chooses otherwise (the wave builder's default). */
export const DEFAULT_ROUTING: RoutingMethodKey = 'best+local';

const CONSTRUCTION_LABELS: Record<string, string> = {
  'nearest-neighbor': 'Nearest neighbor',
  'repeated-nearest-neighbor': 'Repeated nearest neighbor',
  'sorted-edges': 'Sorted edges',
  best: 'Best of repeated NN and sorted edges',
};
const IMPROVE_SUFFIX: Record<string, string> = { none: '', local: ' + 2-opt/Or-opt', deep: ' + deep search' };

export const ROUTING_LABELS: Record<RoutingMethodKey, string> = Object.fromEntries(
  ROUTING_METHOD_KEYS.map((k) => {
    const [c, imp] = k.split('+');
    if (imp !== undefined) return [k, `${CONSTRUCTION_LABELS[c!]}${IMPROVE_SUFFIX[imp]}`];
    const named: Record<string, string> = {
      exact: 'Exact (Held–Karp, ≤ 16 stops)',
      's-shape': 'S-shape (traversal)',
      return: 'Return',
      midpoint: 'Midpoint',
      'largest-gap': 'Largest gap',
      combined: 'Combined',
      'ratliff-rosenthal': 'Exact single block (Ratliff & Rosenthal)',
    };
    return [k, named[k]!];
  }),
) as Record<RoutingMethodKey, string>;

/** One change of a what-if plan. Metres in the plan's coordinates. */
export const PlanChange = z.discriminatedUnion('kind', [
  z.strictObject({ kind: z.literal('close_aisle'), aisle: z.string().trim().min(1).max(40), fromM: z.number(), toM: z.number() }),
  z.strictObject({ kind: z.literal('add_cross_aisle'), yM: z.number() }),
  z.strictObject({ kind: z.literal('move_depot'), xM: z.number(), yM: z.number() }),
]);
export type PlanChange = z.infer<typeof PlanChange>;

export const WhatIf = z
  .strictObject({
    label: z.string().trim().min(1).max(80),
    /** A candidate layout uploaded for studies (`/studies/layouts`): the what-if plan is that layout, then `changes` on it. */
    layoutId: z.number().int().positive().optional(),
    changes: z.array(PlanChange).max(5).default([]),
  })
  .refine((w) => w.layoutId !== undefined || w.changes.length > 0, { message: 'a what-if needs a change or a candidate layout', path: ['changes'] });
export type WhatIf = z.infer<typeof WhatIf>;

export const StudyPlanSource = z.discriminatedUnion('source', [
  z.strictObject({ source: z.literal('active') }),
  z.strictObject({ source: z.literal('plan'), planId: z.number().int().positive() }),
  z.strictObject({ source: z.literal('generated'), params: GeneratePlanParams }),
]);
export type StudyPlanSource = z.infer<typeof StudyPlanSource>;

/** Generated orders: SKUs slotted at random over the bins; popularity follows an ABC curve. */
export const GeneratedOrders = z
  .strictObject({
    waves: z.number().int().min(1).max(20),
    ordersPerWave: z.number().int().min(1).max(400),
    linesMin: z.number().int().min(1).max(40),
    linesMax: z.number().int().min(1).max(40),
    /** SKUs in the range; capped at the plan's bin count. */
    skus: z.number().int().min(1).max(50_000),
    /** "skuPct % of the SKUs draw linesPct % of the lines", e.g. 20/80. */
    skewSkuPct: z.number().gt(0).lt(100),
    skewLinesPct: z.number().gt(0).lt(100),
    qtyMax: z.number().int().min(1).max(50).default(3),
  })
  .refine((o) => o.linesMin <= o.linesMax, { message: 'linesMin must not exceed linesMax', path: ['linesMin'] })
  .refine((o) => o.skewLinesPct >= o.skewSkuPct, { message: 'the popular share of lines must be at least the share of SKUs', path: ['skewLinesPct'] });
export type GeneratedOrders = z.infer<typeof GeneratedOrders>;

export const StudyWork = z.discriminatedUnion('kind', [
  z.strictObject({
    kind: z.literal('recorded'),
    /** Chosen by hand; or all released waves created in [from, to] (ISO dates, inclusive). */
    waveIds: z.array(z.number().int().positive()).max(200).optional(),
    from: z.iso.date().optional(),
    to: z.iso.date().optional(),
  }),
  z.strictObject({
    kind: z.literal('generated'),
    plan: StudyPlanSource,
    orders: GeneratedOrders,
    /** Batching of the trips the routing methods are compared on. */
    batching: BatchingName.default('savings'),
    cartProfileId: z.number().int().positive().optional(),
    /**
     * The cart's sizes as they were when the study was saved (filled in by the server from the profile,
     * or the fallback cart), so a rerun gives the same figures after the profile is edited or removed.
     */
    cart: z.strictObject({ totes: z.number().int().min(1).max(100), maxKg: z.number().positive(), maxLitres: z.number().positive() }).optional(),
    /** How many waves like these the site picks a day: scales hours to hours per day. */
    wavesPerDay: z.number().positive().max(200),
  }),
]);
export type StudyWork = z.infer<typeof StudyWork>;

export const MAX_REPLICATIONS = 30;
export const REPLICATIONS_RECORDED_MESSAGE = 'recorded waves happened once: there is nothing to replicate, so replications stay at 1';

export const StudyInputs = z
  .strictObject({
    name: z.string().trim().min(1).max(120),
    work: StudyWork,
    routing: z
      .array(RoutingMethodKey)
      .min(1)
      .default([...ROUTING_METHOD_KEYS]),
    batching: z.array(BatchingName).default(['single', 'fcfs', 'seed', 'savings', 'search']),
    whatIfs: z.array(WhatIf).max(4).default([]),
    seed: z
      .number()
      .int()
      .min(0)
      .max(2 ** 31 - 1)
      .default(1),
    /**
     * Generated work only: the scenario is drawn and run once per seed (seed, seed + 1, …) and each
     * method's figures are shown as a mean with a 95 % interval. Recorded waves happened once.
     */
    replications: z.number().int().min(1).max(MAX_REPLICATIONS).default(1),
  })
  .refine((s) => s.work.kind === 'generated' || s.replications === 1, {
    message: REPLICATIONS_RECORDED_MESSAGE,
    path: ['replications'],
  });
export type StudyInputs = z.infer<typeof StudyInputs>;
export type StudyInputsBody = z.input<typeof StudyInputs>;

const num = z.number();
const maybe = num.nullable();

/** The figures a routing row and a batching row share; `n` is the number schema (nullable for routing). */
const figures = <N extends z.ZodType>(n: N) => ({
  metres: n,
  metresPerTrip: n,
  metresPerLine: n,
  aboveBestPct: n,
  aboveBoundPct: n,
  /** Walking plus handling at the site's speeds, for the work in the study. */
  hours: n,
  hoursPerDay: n,
  /** Compute time, milliseconds (wall clock; the only figure that changes between runs). */
  ms: num,
});

/** One routing method on one plan: the whole work routed by it. */
export const RoutingRow = z.object({
  key: RoutingMethodKey,
  label: z.string(),
  /** False when the method does not apply (layout, trip size); `reason` says why. */
  applicable: z.boolean(),
  reason: z.string().nullable(),
  ...figures(maybe),
  /**
   * Exact method only, when some trips have too many stops for it: the trips it solved. The others are
   * counted at their lower bound, so the row's metres are then a lower bound themselves.
   */
  solved: z.number().int().nullable().default(null),
});
export type RoutingRow = z.infer<typeof RoutingRow>;

export const BatchingRow = z.object({
  method: BatchingName,
  label: z.string(),
  trips: z.number().int(),
  orders: z.number().int(),
  lines: z.number().int(),
  ...figures(num),
});
export type BatchingRow = z.infer<typeof BatchingRow>;

/** One trip of the routed work: its stops and what each method makes of it. */
export const StudyTrip = z.object({
  /** 1-based across the study. */
  n: z.number().int(),
  wave: z.number().int(),
  orders: z.number().int(),
  lines: z.number().int(),
  /** Walk-graph nodes of the stops, ascending (the engine's input order). */
  nodes: z.array(z.number().int()),
  lowerBound: num,
  metres: z.record(z.string(), maybe),
  /** Visiting order per method, as indices into `nodes`. */
  visits: z.record(z.string(), z.array(z.number().int())),
});
export type StudyTrip = z.infer<typeof StudyTrip>;

export const StudyVariant = z.object({
  key: z.string(),
  label: z.string(),
  changes: z.array(PlanChange),
  /** The candidate layout the what-if is built on, or null (the study's base plan). */
  layoutId: z.number().int().nullable().default(null),
  layout: z.object({
    aisles: z.number().int(),
    crossAisles: z.number().int(),
    bins: z.number().int(),
    blocks: z.number().int().nullable(),
    policyNote: z.string().nullable(),
  }),
  depotNode: z.number().int(),
  routing: z.array(RoutingRow),
  batching: z.array(BatchingRow),
  trips: z.array(StudyTrip),
  unplaced: z.array(z.object({ order: z.string(), reason: z.string() })),
  lowerBound: num,
  lines: z.number().int(),
});
export type StudyVariant = z.infer<typeof StudyVariant>;

export const WhatIfRow = z.object({
  variant: z.string(),
  label: z.string(),
  method: z.string(),
  methodLabel: z.string(),
  baseMetres: maybe,
  metres: maybe,
  deltaMetres: maybe,
  deltaPct: maybe,
  deltaHoursPerDay: maybe,
  /** Set when the two plans did not carry the same lines (orders unreachable on one): no difference is given. */
  note: z.string().nullable().default(null),
});
export type WhatIfRow = z.infer<typeof WhatIfRow>;

/** Recorded waves: what was planned against what pickers walked, stops in the order they confirmed them. */
export const RecordedWaveRow = z.object({
  waveId: z.number().int(),
  name: z.string(),
  trips: z.number().int(),
  confirmedTrips: z.number().int(),
  plannedMetres: num,
  /** Planned metres of the trips with confirmed stops only, so it compares with `walkedMetres`. */
  plannedConfirmedMetres: num,
  walkedMetres: maybe,
  walkedAbovePlannedPct: maybe,
  /** The same trips routed now by the default method on the study's base plan. */
  defaultMetres: maybe,
});
export type RecordedWaveRow = z.infer<typeof RecordedWaveRow>;

/**
 * Mean of a figure over the replications with its 95 % interval (Student's t, n − 1 degrees of freedom):
 * sample standard deviation `sd`, `t`, `halfWidth`, `low` and `high` are null with one replication.
 */
export const Interval = z.object({ n: z.number().int(), mean: num, sd: maybe, t: maybe, halfWidth: maybe, low: maybe, high: maybe });
export type Interval = z.infer<typeof Interval>;

/** One method's figure in every replication (in seed order), and its interval when every replication has one. */
export const ReplicatedFigure = z.object({
  key: z.string(),
  label: z.string(),
  metres: z.array(maybe),
  hoursPerDay: z.array(maybe),
  metresCi: Interval.nullable(),
  hoursPerDayCi: Interval.nullable(),
});
export type ReplicatedFigure = z.infer<typeof ReplicatedFigure>;

export const Replications = z.object({
  seeds: z.array(z.number().int()),
  variants: z.array(z.object({ key: z.string(), label: z.string(), routing: z.array(ReplicatedFigure), batching: z.array(ReplicatedFigure) })),
  /** What-if differences paired by seed: `metres` and `hoursPerDay` hold the differences. */
  whatIf: z.array(ReplicatedFigure.extend({ variant: z.string() })),
});
export type Replications = z.infer<typeof Replications>;

export const StudyResults = z.object({
  seed: z.number().int(),
  speeds: z.object({ walkingSpeedMps: num, secondsPerLine: num, secondsPerStop: num }),
  cart: z.object({ totes: z.number().int(), maxKg: num, maxLitres: num }),
  /** Hours per day = hours × dayScale (waves per day ÷ waves in the study, or 1 ÷ days covered). */
  dayScale: num,
  defaultRouting: RoutingMethodKey,
  variants: z.array(StudyVariant),
  whatIf: z.array(WhatIfRow),
  recorded: z.array(RecordedWaveRow).nullable(),
  notes: z.array(z.string()),
  ms: num,
  /** With more than one replication: every method's figures per seed, mean and interval. The rest is the first seed's. */
  replications: Replications.nullable().default(null),
});
export type StudyResults = z.infer<typeof StudyResults>;

export const StudyStatus = z.enum(['queued', 'running', 'done', 'failed', 'cancelled']);
export type StudyStatus = z.infer<typeof StudyStatus>;

export const StudySummary = z.object({
  id: z.number().int(),
  name: z.string(),
  kind: z.enum(['recorded', 'generated']),
  status: StudyStatus,
  progress: num,
  phase: z.string().nullable(),
  seed: z.number().int(),
  createdBy: z.string().nullable(),
  createdAt: z.string(),
  finishedAt: z.string().nullable(),
  rerunOf: z.number().int().nullable(),
  error: z.string().nullable(),
  /** Set while the study is archived: hidden from the default list, kept whole. */
  archivedAt: z.string().nullable().default(null),
});
export type StudySummary = z.infer<typeof StudySummary>;

/** The studies list: archived studies are left out unless asked for. */
export const StudyListQuery = z.strictObject({ archived: z.enum(['hide', 'include']).default('hide') });

/** A candidate layout uploaded for what-if studies: a floor-plan workbook checked like a plan upload, never a plan of the site. */
export const CandidateLayout = z.object({
  id: z.number().int(),
  name: z.string(),
  filename: z.string(),
  stats: FloorPlanStats,
  createdBy: z.string().nullable(),
  createdAt: z.string(),
});
export type CandidateLayout = z.infer<typeof CandidateLayout>;

/** The answer to a candidate upload: the row-by-row problems (nothing saved), or the saved layout. */
export const CandidateLayoutUpload = z.object({
  ok: z.boolean(),
  errors: z.array(RowIssue),
  warnings: z.array(RowIssue),
  layout: CandidateLayout.nullable(),
});
export type CandidateLayoutUpload = z.infer<typeof CandidateLayoutUpload>;

export const StudyDetail = StudySummary.extend({
  inputs: StudyInputs,
  results: StudyResults.nullable(),
});
export type StudyDetail = z.infer<typeof StudyDetail>;

/** A route of one trip by one method, drawn on the variant's plan. */
export const StudyRoute = z.object({
  method: z.string(),
  label: z.string(),
  metres: maybe,
  points: z.array(z.object({ x: num, y: num })),
  stops: z.array(z.object({ n: z.number().int(), x: num, y: num })),
  reason: z.string().nullable(),
});
export type StudyRoute = z.infer<typeof StudyRoute>;

export const StudyRouteQuery = z.strictObject({
  variant: z.string().min(1).max(40),
  trip: z.coerce.number().int().positive(),
  method: RoutingMethodKey,
});

const CONSTRUCTION_HINTS: Record<string, string> = {
  'nearest-neighbor': 'Walks to the closest stop not yet visited, from the depot.',
  'repeated-nearest-neighbor': 'Nearest neighbor started from every stop in turn; the shortest circuit is kept.',
  'sorted-edges': 'Joins the shortest links between stops first, never closing a loop early.',
  best: 'The shorter of repeated nearest neighbor and sorted edges.',
};
const IMPROVE_HINTS: Record<string, string> = {
  none: '',
  local:
    ' Then 2-opt and Or-opt moves (reverse a stretch, move a run of stops) and swaps of two stretches, plus exchanges of up to four links on trips of over 150 stops, until none shortens the walk. The same trip always gets the same circuit.',
  deep: ' Then deep search: a Lin–Kernighan search with 3-opt steps, then repeated random double-bridge kicks, each repaired by that search, keeping the best, within a fixed step budget; on trips of 200 stops or more, several such searches, each from its own starting circuit, whose best parts are combined.',
};

/** One or two sentences per routing method, shown beside its name in the study screens. */
export const ROUTING_HINTS: Record<RoutingMethodKey, string> = Object.fromEntries(
  ROUTING_METHOD_KEYS.map((k) => {
    const [c, imp] = k.split('+');
    if (imp !== undefined) return [k, `${CONSTRUCTION_HINTS[c!]}${IMPROVE_HINTS[imp]}`];
    const named: Record<string, string> = {
      exact:
        'Held–Karp dynamic programming: the shortest possible circuit, for trips of up to 16 stops; longer trips are counted at their lower bound and the row says how many were solved.',
      's-shape':
        'Every aisle with a pick is walked end to end, zig-zagging from aisle to aisle, block by block; the usual rule when nothing else is planned, on any layout of parallel aisles with cross aisles.',
      return: 'Enters each aisle with a pick from the front and turns back at its farthest pick. One block only.',
      midpoint:
        'Picks in the front half of each aisle from the front, the back half from the back; the first and last aisles are walked through. One block only.',
      'largest-gap': 'Like midpoint, but each aisle turns back at its largest gap between picks. One block only (no middle cross aisle).',
      combined: 'Chooses per aisle between walking through and turning back, whichever sets up the next aisle better. One block only.',
      'ratliff-rosenthal': 'The shortest route on a single-block layout, by dynamic programming over the aisles. One block only.',
    };
    return [k, named[k]!];
  }),
) as Record<RoutingMethodKey, string>;
