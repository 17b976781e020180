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

// ---- Stored plans, build jobs and closures (floor-plan domain section; the check's shapes are above) ----

export const FloorPlanState = z.enum(['draft', 'active', 'retired']);
export type FloorPlanState = z.infer<typeof FloorPlanState>;

/** Largest plan the server stores (bins). */
export const MAX_PLAN_BINS = 100_000;

export const DepotPlacement = z.enum(['front_left', 'front_centre']);

/** Parameters of a generated rectangular plan (metres); mirrors server/core/plan/generate.ts. */
export const GeneratePlanParams = z
  .strictObject({
    aisles: z.number().int().min(1).max(200),
    aisleLengthM: z.number().positive().max(500),
    aisleSpacingM: z.number().positive().max(50),
    baysPerAisle: z.number().int().min(1).max(500),
    levels: z.number().int().min(1).max(20),
    bothSides: z.boolean().default(true),
    crossAisles: z.strictObject({
      front: z.boolean().default(true),
      back: z.boolean().default(true),
      middle: z.number().int().min(0).max(10).default(0),
    }),
    crossAisleWidthM: z.number().min(0).max(20).default(3),
    depot: DepotPlacement.default('front_left'),
  })
  .refine((p) => p.crossAisles.front || p.crossAisles.back || p.crossAisles.middle > 0, {
    message: 'a plan needs at least one cross aisle',
    path: ['crossAisles'],
  })
  .refine((p) => p.aisles * p.baysPerAisle * p.levels * (p.bothSides ? 2 : 1) <= MAX_PLAN_BINS, {
    message: `at most ${MAX_PLAN_BINS} bins per plan`,
    path: ['baysPerAisle'],
  });
export type GeneratePlanParams = z.infer<typeof GeneratePlanParams>;

/**
 * The layout the plan generator's form starts from, and the demo site's: 12 aisles of 30 bays on both
 * sides, 4 levels (2,880 bins), front, middle and back cross aisles, the depot at the front centre.
 */
export const DEFAULT_PLAN_PARAMS: GeneratePlanParams = {
  aisles: 12,
  aisleLengthM: 48,
  aisleSpacingM: 3.2,
  baysPerAisle: 30,
  levels: 4,
  bothSides: true,
  crossAisles: { front: true, back: true, middle: 1 },
  crossAisleWidthM: 3,
  depot: 'front_centre',
};

export const GenerateFloorPlanBody = z.strictObject({
  name: z.string().trim().min(1).max(120),
  params: GeneratePlanParams,
});
export type GenerateFloorPlanBody = z.input<typeof GenerateFloorPlanBody>;

export const UserRef = z.object({ id: z.number().int(), name: z.string() });

export const FloorPlanSummary = z.object({
  id: z.number().int(),
  siteId: z.number().int(),
  version: z.number().int(),
  name: z.string(),
  state: FloorPlanState,
  source: z.enum(['upload', 'generated']),
  sourceFilename: z.string().nullable(),
  generatorParams: GeneratePlanParams.nullable(),
  uploadedBy: UserRef.nullable(),
  createdAt: z.string(),
  activatedAt: z.string().nullable(),
  retiredAt: z.string().nullable(),
  stats: FloorPlanStats,
  /** Bytes of the stored walk graph and distance index. */
  storedBytes: z.number().int(),
  /** Walk graph + distance index build time, ms. */
  buildMs: z.number(),
  closureVersion: z.number().int(),
  openClosures: z.number().int(),
  /** Retired plans and plans used by waves cannot be changed or deleted. */
  readOnly: z.boolean(),
});
export type FloorPlanSummary = z.infer<typeof FloorPlanSummary>;

export const ClosureKind = z.enum(['aisle', 'cross_aisle']);

export const FloorPlanClosure = z.object({
  id: z.number().int(),
  kind: ClosureKind,
  code: z.string(),
  /** Closed range along the centre line, metres (y for an aisle, x for a cross aisle). */
  fromM: z.number(),
  toM: z.number(),
  reason: z.string().nullable(),
  createdBy: UserRef.nullable(),
  createdAt: z.string(),
});
export type FloorPlanClosure = z.infer<typeof FloorPlanClosure>;

export const FloorPlanDetail = FloorPlanSummary.extend({
  warnings: z.array(RowIssue),
  closures: z.array(FloorPlanClosure),
  /** Bins no walk from the depot reaches under the open closures. */
  unreachableBins: z.array(z.string()),
});
export type FloorPlanDetail = z.infer<typeof FloorPlanDetail>;

export const CloseSegmentBody = z
  .strictObject({
    kind: ClosureKind.default('aisle'),
    code: z.string().trim().min(1).max(40),
    fromM: z.number().finite(),
    toM: z.number().finite(),
    reason: z.string().trim().max(200).optional(),
  })
  .refine((b) => b.toM > b.fromM, { message: 'must be greater than fromM', path: ['toM'] });
export type CloseSegmentBody = z.input<typeof CloseSegmentBody>;

export const ClosureOutcome = z.enum(['closed', 'already_closed', 'extended', 'reopened']);
export type ClosureOutcome = z.infer<typeof ClosureOutcome>;

export const ClosureResult = z.object({
  plan: FloorPlanDetail,
  /**
   * What the request did: a new closure; nothing, as an open closure already covers the stretch (that
   * closure is returned); an open closure that overlapped it extended to cover both; or a reopening.
   */
  outcome: ClosureOutcome,
  /** The closure created, found or extended; null after a reopening. */
  closure: FloorPlanClosure.nullable(),
  /** One sentence for people, in agreement with the lists below it. */
  message: z.string(),
  /** Bins unreachable now, and those that became unreachable with this change. */
  unreachableBins: z.array(z.string()),
  newlyUnreachable: z.array(z.string()),
});
export type ClosureResult = z.infer<typeof ClosureResult>;

export const ActiveFloorPlan = z.object({
  plan: FloorPlanSummary,
  geometry: PlanGeometry,
  closures: z.array(FloorPlanClosure),
});
export type ActiveFloorPlan = z.infer<typeof ActiveFloorPlan>;

export const JobPhase = z.enum(['queued', 'parsing', 'checking', 'building_graph', 'building_distances', 'saving', 'done', 'cancelled']);
export type JobPhase = z.infer<typeof JobPhase>;

/** Words for each phase, shown beside the progress bar. */
export const JOB_PHASE_LABEL: Record<JobPhase, string> = {
  queued: 'Waiting for the previous build',
  parsing: 'Reading the workbook',
  checking: 'Checking every row',
  building_graph: 'Building the walk graph',
  building_distances: 'Computing shortest walking distances',
  saving: 'Saving the draft',
  done: 'Done',
  cancelled: 'Cancelled',
};

export const FloorPlanJob = z.object({
  id: z.string(),
  siteId: z.number().int(),
  kind: z.enum(['upload', 'generate']),
  /** running → done (a draft was saved) | invalid (the file has errors; nothing saved) | failed | cancelled (stopped by a user; nothing saved). */
  status: z.enum(['running', 'done', 'invalid', 'failed', 'cancelled']),
  phase: JobPhase,
  /** 0…1 within the phase. */
  fraction: z.number().min(0).max(1),
  message: z.string().nullable(),
  planId: z.number().int().nullable(),
  errors: z.array(RowIssue),
  warnings: z.array(RowIssue),
  createdAt: z.string(),
  finishedAt: z.string().nullable(),
  /** Upload (or request) to draft, ms; null while running. */
  totalMs: z.number().nullable(),
});
export type FloorPlanJob = z.infer<typeof FloorPlanJob>;

export const DistanceQuery = z.strictObject({ from: z.string().min(1).max(80), to: z.string().min(1).max(80) });
export const DistanceAnswer = z.object({ from: z.string(), to: z.string(), metres: z.number().nullable() });
export type DistanceAnswer = z.infer<typeof DistanceAnswer>;

export const RenameFloorPlanBody = z.strictObject({ name: z.string().trim().min(1).max(120) });

// ---- Activation check (what a plan change would leave without a bin) ----

/** Body of `POST …/floor-plans/:planId/activate`; `acknowledge` is required when the check finds losses. */
export const ActivateFloorPlanBody = z.strictObject({ acknowledge: z.boolean().optional() });
export type ActivateFloorPlanBody = z.input<typeof ActivateFloorPlanBody>;

export const PlanRef = z.object({ id: z.number().int(), version: z.number().int(), name: z.string(), state: FloorPlanState });
export type PlanRef = z.infer<typeof PlanRef>;

export const SkuWithoutBin = z.object({
  sku: z.string(),
  description: z.string(),
  bin: z.string(),
  /** True when the bin is on the plan active now, i.e. activating takes the SKU's bin away. */
  onCurrentPlan: z.boolean(),
});
export type SkuWithoutBin = z.infer<typeof SkuWithoutBin>;

export const UnplaceableOrder = z.object({ ref: z.string(), reason: z.string(), placeableNow: z.boolean() });
export type UnplaceableOrder = z.infer<typeof UnplaceableOrder>;

export const RunningWave = z.object({
  id: z.number().int(),
  name: z.string(),
  status: z.string(),
  planId: z.number().int(),
  planVersion: z.number().int(),
  /** Trips not yet done or cancelled. */
  openTrips: z.number().int(),
});
export type RunningWave = z.infer<typeof RunningWave>;

/** Lists in the answer are cut to this many rows; the downloads hold every row. */
export const ACTIVATION_CHECK_SAMPLE = 50;

export const ActivationCheck = z.object({
  plan: PlanRef,
  /** The plan active now, which activation would retire; null when the site has none (or it is this plan). */
  currentPlan: PlanRef.nullable(),
  /** SKUs in the site's SKU master. */
  skus: z.number().int(),
  /** SKUs whose bin is not on this plan. */
  skusWithoutBin: z.number().int(),
  /** Of those, SKUs whose bin is on the plan active now: activation takes their bin away. */
  skusLosingBin: z.number().int(),
  /** First rows (those losing their bin first); the full list is at `skusWithoutBinDownload`. */
  skusWithoutBinList: z.array(SkuWithoutBin),
  skusWithoutBinDownload: z.object({ xlsx: z.string(), csv: z.string() }),
  openOrders: z.number().int(),
  /** Open orders with a line this plan cannot slot (SKU unknown, its bin not on the plan, or unreachable). */
  openOrdersUnplaceable: z.number().int(),
  /** Of those, orders the plan active now can place: activation takes them off the floor. */
  openOrdersLosingPlacement: z.number().int(),
  openOrdersUnplaceableList: z.array(UnplaceableOrder),
  /** Waves released or being picked on another plan; they keep the plan they were planned on. */
  runningWaves: z.array(RunningWave),
  /** True when activation would take bins or placements away: activate then needs `{ "acknowledge": true }`. */
  needsAcknowledgement: z.boolean(),
});
export type ActivationCheck = z.infer<typeof ActivationCheck>;
