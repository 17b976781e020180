/**
 * Picking on the tablet and the supervisor's live board: what the tablet sends, what it gets back,
 * and the board's snapshot (sent whole on every change over server-sent events).
 */
import { z } from 'zod';
import { ExportFormat } from './data-safety';
import { PlanGeometry } from './floor-plans';
import { PickLineView, StopView, TripDetail } from './waves';

/** Header carrying the tablet's key for one intended action (retries and queued resends reuse it). */
export const IDEMPOTENCY_HEADER = 'idempotency-key';
/** Header naming the tablet, recorded in the audit trail beside who and when. */
export const DEVICE_HEADER = 'x-aislewright-device';

export const IdempotencyKey = z.string().regex(/^[A-Za-z0-9_-]{8,64}$/, '8–64 letters, digits, - or _');

export const SHORT_REASONS = ['empty_bin', 'damaged', 'cannot_reach'] as const;
export const ShortReason = z.enum(SHORT_REASONS);
export type ShortReason = z.infer<typeof ShortReason>;
export const SHORT_REASON_LABELS: Record<ShortReason, string> = {
  empty_bin: 'Empty bin',
  damaged: 'Damaged',
  cannot_reach: 'Cannot reach',
};

/** When the picker acted, by the tablet's clock: queued work done before a reassignment still counts. */
const PickedAt = z.iso.datetime({ offset: true }).optional();

export const ConfirmBody = z.strictObject({
  via: z.enum(['scan', 'tap']),
  /** What the scanner typed (bin or SKU barcode per the site's setting); null for a tap. */
  scan: z.string().trim().max(128).nullable().default(null),
  pickedAt: PickedAt,
  /**
   * The printed stop number the tablet showed with this line when the finger went down. A confirm
   * for a line of another stop is refused (409 line_not_shown): a double tap never confirms the next line.
   */
  stopN: z.number().int().positive().optional(),
});
export type ConfirmBody = z.infer<typeof ConfirmBody>;

export const ShortBody = z.strictObject({
  qtyFound: z.number().int().min(0).max(100000),
  reason: ShortReason,
  pickedAt: PickedAt,
});
export type ShortBody = z.infer<typeof ShortBody>;

export const SkipBody = z.strictObject({ pickedAt: PickedAt });
export const UndoBody = z.strictObject({});
/** The supervisor's correction of a recorded line: it goes back to open, with a reason for the audit trail. */
export const ReopenLineBody = z.strictObject({ reason: z.string().trim().min(1).max(200) });
/** A just-confirmed line can be undone on the tablet this long after the server received it. */
export const UNDO_WINDOW_MS = 10_000;
export type SkipBody = z.infer<typeof SkipBody>;
export const FinishBody = z.strictObject({});
/** Cart set-up before the first stop: each of the trip's totes confirmed by a scan of its label or a tap. */
export const CartReadyBody = z.strictObject({
  totes: z
    .array(z.strictObject({ tote: z.number().int().min(1), via: z.enum(['scan', 'tap']) }))
    .min(1)
    .max(100),
});
export type CartReadyBody = z.infer<typeof CartReadyBody>;

export const PickStop = StopView.extend({
  skipped: z.boolean(),
  /** No walk reaches this stop now (a closed stretch): report its lines short as "cannot reach", or wait. */
  cutOff: z.boolean(),
});
export type PickStop = z.infer<typeof PickStop>;

export const PickTrip = TripDetail.extend({
  stopList: z.array(PickStop),
  siteId: z.number().int(),
  confirmScan: z.enum(['bin', 'sku']),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
  /** When the picker confirmed the cart set-up (which order goes in which tote); null until then. */
  cartReadyAt: z.string().nullable(),
  /** First open stop in stop order; null when every line is done. */
  currentStopId: z.number().int().nullable(),
  /** Raised by every change to the trip (see TripPulse). */
  revision: z.number().int(),
  /** When a closure change last re-routed the remaining stops; null when it never did. */
  routeChangedAt: z.string().nullable(),
});
export type PickTrip = z.infer<typeof PickTrip>;

export const CurrentTrip = z.object({ trip: PickTrip.nullable(), releasedTrips: z.number().int() });
export type CurrentTrip = z.infer<typeof CurrentTrip>;

export const TripResult = z.object({
  tripId: z.number().int(),
  n: z.number().int(),
  waveName: z.string(),
  status: z.enum(['released', 'assigned', 'picking', 'done', 'cancelled']),
  lines: z.number().int(),
  picked: z.number().int(),
  shorts: z.number().int(),
  cancelled: z.number().int(),
  stops: z.number().int(),
  plannedMetres: z.number(),
  /** Depot → stops in the order actually finished → depot, on the plan's distances; null when no walk can be measured (a closure). */
  walkedMetres: z.number().nullable(),
  estMinutes: z.number(),
  /** Start to finish (or to now while the trip runs); null before the start. */
  minutes: z.number().nullable(),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
});
export type TripResult = z.infer<typeof TripResult>;

/** Answer to a skip: the trip as it now stands, re-sequenced. */
export const PickAnswer = z.object({ trip: PickTrip });
export type PickAnswer = z.infer<typeof PickAnswer>;

/** 409 already_confirmed details: who confirmed the line, and when. */
export const AlreadyConfirmed = z.object({
  lineId: z.number().int(),
  by: z.string().nullable(),
  byId: z.number().int().nullable(),
  at: z.string().nullable(),
  status: z.string(),
});

// ---- live board ----

export const BoardTrip = z.object({
  id: z.number().int(),
  n: z.number().int(),
  status: z.enum(['released', 'assigned', 'picking', 'done', 'cancelled']),
  pickerId: z.number().int().nullable(),
  pickerName: z.string().nullable(),
  stops: z.number().int(),
  stopsDone: z.number().int(),
  lines: z.number().int(),
  linesDone: z.number().int(),
  shorts: z.number().int(),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
  elapsedMinutes: z.number().nullable(),
  /** Walk from the last finished stop through the open ones and back, plus handling, at site speeds (cut-off stops left out). */
  remainingMinutes: z.number(),
  /** Open lines no walk reaches now (a closed stretch). */
  cutOffLines: z.number().int(),
  estMinutes: z.number(),
});
export type BoardTrip = z.infer<typeof BoardTrip>;

export const BoardWave = z.object({
  id: z.number().int(),
  name: z.string(),
  status: z.enum(['released', 'picking', 'completed', 'cancelled']),
  trips: z.array(BoardTrip),
  lines: z.number().int(),
  linesDone: z.number().int(),
  shorts: z.number().int(),
  remainingMinutes: z.number(),
  /** Pickers the forecast divides the remaining work among (at least 1). */
  pickersCounted: z.number().int(),
  /** now + remaining work ÷ pickers counted; null when nothing remains. */
  forecastAt: z.string().nullable(),
});
export type BoardWave = z.infer<typeof BoardWave>;

export const BoardShort = z.object({
  id: z.number().int(),
  waveId: z.number().int(),
  waveName: z.string(),
  tripId: z.number().int(),
  tripN: z.number().int(),
  orderRef: z.string(),
  sku: z.string(),
  description: z.string(),
  bin: z.string(),
  qtyOrdered: z.number().int(),
  qtyFound: z.number().int(),
  reason: ShortReason,
  reportedBy: z.string().nullable(),
  reportedAt: z.string(),
});
export type BoardShort = z.infer<typeof BoardShort>;

/** What the supervisor did about a short: marked handled, re-picked in a later wave, or sent to the replenishment list. */
export const ShortFollowUp = z.enum(['handled', 'repick', 'replenish']);
export type ShortFollowUp = z.infer<typeof ShortFollowUp>;

/** A short with its follow-up chosen, as the board lists it for the rest of the shift. */
export const HandledShort = BoardShort.extend({
  followUp: ShortFollowUp,
  handledBy: z.string().nullable(),
  handledAt: z.string(),
  /** The open order made for the quantity not found (follow-up "repick"). */
  repickOrder: z.object({ id: z.number().int(), ref: z.string() }).nullable(),
});
export type HandledShort = z.infer<typeof HandledShort>;

/** The answer to choosing a follow-up: the short, and the re-pick order when one was made. */
export const ShortFollowUpResult = z.object({
  shortId: z.number().int(),
  followUp: ShortFollowUp,
  repickOrder: z.object({ id: z.number().int(), ref: z.string() }).nullable(),
});
export type ShortFollowUpResult = z.infer<typeof ShortFollowUpResult>;

/** One entry of the replenishment list: a bin found short, to be refilled. */
export const ReplenishmentItem = z.object({
  shortId: z.number().int(),
  sku: z.string(),
  description: z.string(),
  bin: z.string(),
  /** Ordered less found: what the bin lacked. */
  qtyShort: z.number().int(),
  reason: ShortReason,
  orderId: z.number().int(),
  orderRef: z.string(),
  waveName: z.string(),
  tripN: z.number().int(),
  reportedBy: z.string().nullable(),
  reportedAt: z.string(),
  sentBy: z.string().nullable(),
  sentAt: z.string(),
  restockedBy: z.string().nullable(),
  restockedAt: z.string().nullable(),
});
export type ReplenishmentItem = z.infer<typeof ReplenishmentItem>;

export const ReplenishmentQuery = z.strictObject({
  /** open: not restocked yet (the default); all: restocked ones too. */
  show: z.enum(['open', 'all']).default('open'),
});
export type ReplenishmentQuery = z.infer<typeof ReplenishmentQuery>;
export const ReplenishmentExportQuery = ReplenishmentQuery.extend({ format: ExportFormat.default('xlsx') });

/** An open line of a trip in progress that no walk reaches now: for the supervisor to handle. */
export const BoardCutOffLine = z.object({
  lineId: z.number().int(),
  waveId: z.number().int(),
  waveName: z.string(),
  tripId: z.number().int(),
  tripN: z.number().int(),
  stopN: z.number().int(),
  pickerName: z.string().nullable(),
  orderRef: z.string(),
  sku: z.string(),
  bin: z.string(),
  qty: z.number().int(),
});
export type BoardCutOffLine = z.infer<typeof BoardCutOffLine>;

export const Board = z.object({
  siteId: z.number().int(),
  at: z.string(),
  waves: z.array(BoardWave),
  shorts: z.array(BoardShort),
  /** Shorts whose follow-up was chosen in the last shift, newest first, with what was chosen. */
  handledShorts: z.array(HandledShort),
  cutOff: z.array(BoardCutOffLine),
  pickers: z.array(z.object({ id: z.number().int(), name: z.string(), tripId: z.number().int().nullable() })),
});
export type Board = z.infer<typeof Board>;

export const AssignBody = z.strictObject({ pickerId: z.number().int().positive() });
export const CancelTripBody = z.strictObject({ reason: z.string().trim().max(200).optional() });
export const CloseWaveBody = z.strictObject({ reason: z.string().trim().max(200).optional() });
export const CancelResult = z.object({
  tripId: z.number().int(),
  linesCancelled: z.number().int(),
  /** Orders with nothing picked yet: back to open orders as they were. */
  ordersReopened: z.array(z.string()),
  /** Orders partly picked: done with what is in the cart; their cancelled lines make a new open order each (`<ref>-R1`). */
  remainderOrders: z.array(z.string()).default([]),
});
export const CloseWaveResult = z.object({
  waveId: z.number().int(),
  tripsCancelled: z.number().int(),
  linesCancelled: z.number().int(),
  reportMailedTo: z.array(z.string()),
});

/** The trip's floor plan for the tablet's map: geometry and the closures its routes avoid. */
export const TripPlan = z.object({
  geometry: PlanGeometry,
  closures: z.array(z.object({ kind: z.enum(['aisle', 'cross_aisle']), code: z.string(), from: z.number(), to: z.number() })),
});
export type TripPlan = z.infer<typeof TripPlan>;

/** Answer to a confirmation or a short: the line as recorded, its stop, and the trip's revision. */
export const LineAnswer = z.object({
  tripId: z.number().int(),
  tripStatus: z.enum(['released', 'assigned', 'picking', 'done', 'cancelled']),
  revision: z.number().int(),
  line: PickLineView,
  stop: z.object({ id: z.number().int(), status: z.enum(['open', 'done']) }),
});
export type LineAnswer = z.infer<typeof LineAnswer>;

/** The tablet's 5-second poll: one row; a changed revision means "read the trip again". */
export const TripPulse = z.object({
  id: z.number().int(),
  status: z.enum(['released', 'assigned', 'picking', 'done', 'cancelled']),
  revision: z.number().int(),
});
export type TripPulse = z.infer<typeof TripPulse>;
