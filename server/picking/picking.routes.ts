/**
 * Picking routes (the picker's tablet) and the live board (supervisors). A picker reads and writes
 * only trips assigned to them: another picker's trip is 403 on every picking route. Every picker
 * write carries an Idempotency-Key header (retries and the tablet's offline queue reuse it).
 */
import type { Request } from 'express';
import type { Role } from '../../shared/common';
import { Ok } from '../../shared/common';
import {
  AssignBody,
  Board,
  CancelResult,
  CancelTripBody,
  CloseWaveBody,
  CloseWaveResult,
  ConfirmBody,
  CurrentTrip,
  DEVICE_HEADER,
  CartReadyBody,
  FinishBody,
  IDEMPOTENCY_HEADER,
  LineAnswer,
  PickAnswer,
  PickTrip,
  ReopenLineBody,
  ReplenishmentExportQuery,
  ReplenishmentItem,
  ReplenishmentQuery,
  ShortBody,
  ShortFollowUpResult,
  SkipBody,
  TripPlan,
  TripPulse,
  TripResult,
  UndoBody,
} from '../../shared/picking';
import { z } from 'zod';
import { audit } from '../audit/audit';
import { exportTable, sendExport } from '../exports/table-export';
import { loadPlanIndex } from '../floor-plans/plan-index';
import { siteCodeOf } from '../sites/sites.repository';
import { notFound } from '../http/errors';
import { pathId } from '../http/path-id';
import { sendAttachment, XLSX_TYPE } from '../http/attachment';
import { openEventStream, requireEventStream } from '../http/event-stream';
import { defineRoute, routesWith, type Access, type RouteContext } from '../http/route';
import type { SessionUser } from '../http/session';
import type { Deps } from '../deps';
import type { Knex } from 'knex';
import * as board from './board.service';
import { getWaveRow } from './picking.repository';
import * as picking from './picking.service';
import { buildWaveReport } from './report';

const PICKER: readonly Role[] = ['picker'];
const SUPERVISE: readonly Role[] = ['supervisor', 'admin'];

function actorOf(user: SessionUser, req: Request): picking.Actor {
  const device = (req.get(DEVICE_HEADER) ?? req.get('user-agent') ?? '').slice(0, 200) || null;
  return { id: user.id, name: user.name, role: user.role, siteIds: user.siteIds, device };
}

function keyed<B, Q, P extends string, A extends Access>(ctx: RouteContext<B, Q, P, A>): picking.KeyedRequest {
  return { key: ctx.req.get(IDEMPOTENCY_HEADER) || undefined, method: ctx.req.method, path: ctx.req.path, body: ctx.body };
}

/** A supervisor's action on the live board, and a picker's write to a trip. */
const boardAction = routesWith('post', SUPERVISE);
const pickerWrite = routesWith('post', PICKER);

/** The first arguments of every picker write on a trip (and on one of its lines). */
type TripContext = { deps: Deps; user: SessionUser; req: Request; params: { tripId: string } };
const onTrip = (ctx: TripContext): [Knex, picking.Actor, number] => [ctx.deps.db, actorOf(ctx.user, ctx.req), pathId(ctx.params.tripId, 'Trip')];
const onLine = (ctx: TripContext & { params: { lineId: string } }): [Knex, picking.Actor, number, number] => [
  ...onTrip(ctx),
  pathId(ctx.params.lineId, 'Pick line'),
];

const trip = '/api/picking/trips/:tripId';
const siteBoard = '/api/sites/:siteId/board';

export const pickingRoutes = [
  defineRoute({
    method: 'get',
    path: '/api/sites/:siteId/picking/current',
    access: PICKER,
    summary: "The picker's trip at this site (null when none) and how many released trips wait",
    response: CurrentTrip,
    handler: ({ deps, user, req, siteId }) => picking.currentTrip(deps.db, actorOf(user, req), siteId),
  }),
  defineRoute({
    method: 'post',
    path: '/api/sites/:siteId/picking/next',
    access: PICKER,
    summary: 'Take the assigned trip, else the next released one (oldest due first); two pickers never get the same trip',
    response: CurrentTrip,
    handler: ({ deps, user, req, siteId }) => picking.takeNextTrip(deps.db, actorOf(user, req), siteId),
  }),
  defineRoute({
    method: 'get',
    path: trip,
    access: PICKER,
    summary: "Your trip: numbered stops, lines, route (403 for another picker's trip)",
    response: PickTrip,
    handler: (ctx) => picking.getPickTrip(...onTrip(ctx)),
  }),
  defineRoute({
    method: 'get',
    path: `${trip}/status`,
    access: PICKER,
    summary: "The tablet's poll: status and revision of your trip (one row)",
    response: TripPulse,
    handler: (ctx) => picking.tripPulse(...onTrip(ctx)),
  }),
  defineRoute({
    method: 'get',
    path: `${trip}/plan`,
    access: PICKER,
    summary: "Geometry of your trip's floor plan, for the trip map",
    response: TripPlan,
    handler: async ({ deps, user, req, params }) => {
      const t = await picking.readableTrip(deps.db, actorOf(user, req), pathId(params.tripId, 'Trip'));
      const wave = (await getWaveRow(deps.db, t.wave_id))!;
      const plan = await loadPlanIndex(deps.db, wave.plan_id);
      return { geometry: plan.geometry, closures: plan.closures };
    },
  }),
  pickerWrite({
    path: `${trip}/start`,
    summary: 'Start the trip after the safety caution (a second call changes nothing)',
    response: PickTrip,
    handler: (ctx) => picking.startTrip(...onTrip(ctx)),
  }),
  pickerWrite({
    path: `${trip}/cart-ready`,
    body: CartReadyBody,
    summary:
      'Cart set-up before the first stop: every tote of the trip confirmed (scan of its label or tap); stored once with an audit entry, a second call changes nothing',
    response: PickTrip,
    handler: (ctx) => picking.cartReady(...onTrip(ctx), ctx.body),
  }),
  pickerWrite({
    path: `${trip}/lines/:lineId/confirm`,
    body: ConfirmBody,
    summary:
      'Confirm a line (scan or tap). Idempotency-Key required: same key and body → stored answer; other body → 422; line done by someone → 409 with who and when; wrong scan → 422 wrong_scan',
    response: LineAnswer,
    handler: (ctx) => picking.confirmLine(...onLine(ctx), ctx.body, keyed(ctx)),
  }),
  pickerWrite({
    path: `${trip}/lines/:lineId/short`,
    body: ShortBody,
    summary: 'Report a line short: quantity found and reason; the supervisor is alerted. Idempotency-Key required',
    response: LineAnswer,
    handler: (ctx) => picking.shortLine(...onLine(ctx), ctx.body, keyed(ctx)),
  }),
  pickerWrite({
    path: `${trip}/lines/:lineId/undo`,
    body: UndoBody,
    summary:
      'Undo a line you confirmed or reported short in the last few seconds: it is open again (audited). Idempotency-Key required; 409 undo_expired after the window',
    response: LineAnswer,
    handler: (ctx) => picking.undoLine(...onLine(ctx), keyed(ctx)),
  }),
  pickerWrite({
    path: `${trip}/stops/:stopId/skip`,
    body: SkipBody,
    summary: 'Skip a stop for now: it moves to the end and the other open stops are re-sequenced. Idempotency-Key required',
    response: PickAnswer,
    handler: (ctx) => picking.skipStop(...onTrip(ctx), pathId(ctx.params.stopId, 'Stop'), ctx.body, keyed(ctx)),
  }),
  pickerWrite({
    path: `${trip}/finish`,
    body: FinishBody,
    summary: 'Return to depot: the trip is done when no line is open (409 lines_open otherwise). Idempotency-Key required',
    response: TripResult,
    handler: (ctx) => picking.finishTrip(ctx.deps.db, ctx.deps.mailer, actorOf(ctx.user, ctx.req), pathId(ctx.params.tripId, 'Trip'), keyed(ctx)),
  }),
  defineRoute({
    method: 'get',
    path: `${trip}/result`,
    access: PICKER,
    summary: 'Trip summary: lines, shorts, metres walked and planned, minutes',
    response: TripResult,
    handler: (ctx) => picking.getTripResult(...onTrip(ctx)),
  }),

  defineRoute({
    method: 'get',
    path: siteBoard,
    access: SUPERVISE,
    summary: 'Live board snapshot: waves in progress, trips, forecasts, shorts needing attention',
    response: Board,
    handler: ({ deps, siteId }) => board.boardSnapshot(deps.db, siteId),
  }),
  defineRoute({
    method: 'get',
    path: `${siteBoard}/events`,
    access: SUPERVISE,
    summary:
      'Live board as server-sent events: `board` with the whole snapshot after each change (one snapshot per site shared by all its streams); 429 too_many_board_streams beyond 5 open streams per person',
    handler: ({ req, res, deps, siteId, user }) => {
      // Only an event stream client may open the endless stream (EventSource always sends this).
      requireEventStream(req);
      // Refused (429) before the response starts when this person holds too many streams.
      deps.boardStreams.checkCap(user.id);
      // The browser's EventSource reconnects by itself; retry says after how long.
      const stream = openEventStream(req, res, { retryMs: 3000 });
      // One snapshot per change per site is built by the app's hub and written to every stream.
      stream.onClose(deps.boardStreams.open(siteId, user.id, res));
      return undefined;
    },
  }),
  boardAction({
    path: `${siteBoard}/trips/:tripId/assign`,
    body: AssignBody,
    summary: 'Assign or reassign a trip to a picker',
    response: Ok,
    handler: async ({ deps, user, req, siteId, params, body }) => {
      await board.assignTrip(deps.db, actorOf(user, req), siteId, pathId(params.tripId, 'Trip'), body.pickerId);
      return { ok: true as const };
    },
  }),
  boardAction({
    path: `${siteBoard}/trips/:tripId/cancel`,
    body: CancelTripBody,
    summary: 'Cancel the rest of a trip: its open lines go back to open orders',
    response: CancelResult,
    handler: ({ deps, user, req, siteId, params, body }) =>
      board.cancelTrip(deps.db, deps.mailer, actorOf(user, req), siteId, pathId(params.tripId, 'Trip'), body.reason ?? null),
  }),
  boardAction({
    path: `${siteBoard}/waves/:waveId/close`,
    body: CloseWaveBody,
    summary: 'Close a wave: trips not done are cancelled (open lines back to open orders); the report is mailed',
    response: CloseWaveResult,
    handler: ({ deps, user, req, siteId, params, body }) =>
      board.closeWave(deps.db, deps.mailer, actorOf(user, req), siteId, pathId(params.waveId, 'Wave'), body.reason ?? null),
  }),
  boardAction({
    path: `${siteBoard}/lines/:lineId/reopen`,
    body: ReopenLineBody,
    summary: 'Correct a recorded line of a trip still open (picked by mistake): it goes back to open for the picker, with the reason audited',
    response: LineAnswer,
    handler: ({ deps, user, req, siteId, params, body }) =>
      picking.correctLine(deps.db, actorOf(user, req), siteId, pathId(params.lineId, 'Pick line'), body.reason),
  }),
  boardAction({
    path: `${siteBoard}/shorts/:shortId/handled`,
    summary: 'Mark a short as handled (it leaves the attention list)',
    response: Ok,
    handler: async ({ deps, user, req, siteId, params }) => {
      await board.handleShort(deps.db, actorOf(user, req), siteId, pathId(params.shortId, 'Short'));
      return { ok: true as const };
    },
  }),
  ...(['repick', 'replenish'] as const).map((followUp) =>
    defineRoute({
      method: 'post',
      path: `${siteBoard}/shorts/:shortId/${followUp}`,
      access: SUPERVISE,
      summary:
        followUp === 'repick'
          ? 'Re-pick a short in a later wave: the quantity not found becomes a new open order <original>-R1 (same due time and priority); the short leaves the attention list'
          : 'Send a short to the replenishment list (its bin is to be refilled); the short leaves the attention list',
      response: ShortFollowUpResult,
      handler: ({ deps, user, req, siteId, params }) => board.followUpShort(deps.db, actorOf(user, req), siteId, pathId(params.shortId, 'Short'), followUp),
    }),
  ),
  defineRoute({
    method: 'get',
    path: '/api/sites/:siteId/replenishment',
    access: SUPERVISE,
    query: ReplenishmentQuery,
    summary: 'The replenishment list: bins found short and sent to it, newest first (show=all adds the restocked ones)',
    response: z.array(ReplenishmentItem),
    handler: ({ deps, siteId, query }) => board.replenishmentList(deps.db, siteId, query.show),
  }),
  defineRoute({
    method: 'get',
    path: '/api/sites/:siteId/replenishment/export',
    access: SUPERVISE,
    query: ReplenishmentExportQuery,
    summary: 'The replenishment list as xlsx or CSV (text that starts like a formula is made inert)',
    handler: async ({ deps, siteId, query, res, user }) => {
      const code = (await siteCodeOf(deps.db, siteId)) ?? 'site';
      const items = await board.replenishmentList(deps.db, siteId, query.show);
      const file = exportTable(board.replenishmentTable(items), query.format, `replenishment-${code}-${new Date().toISOString().slice(0, 10)}`);
      await audit(deps.db, {
        siteId,
        userId: user.id,
        action: 'export.downloaded',
        subject: 'replenishment',
        detail: { format: query.format, show: query.show },
      });
      return sendExport(res, file);
    },
  }),
  defineRoute({
    method: 'post',
    path: '/api/sites/:siteId/replenishment/:shortId/restocked',
    access: SUPERVISE,
    summary: 'Mark a replenishment entry restocked: it leaves the open list (audited)',
    response: Ok,
    handler: async ({ deps, user, req, siteId, params }) => {
      await board.markRestocked(deps.db, actorOf(user, req), siteId, pathId(params.shortId, 'Replenishment entry'));
      return { ok: true as const };
    },
  }),
  defineRoute({
    method: 'get',
    path: `${siteBoard}/waves/:waveId/report.xlsx`,
    access: SUPERVISE,
    summary: 'The wave report as xlsx (per trip planned and walked metres, lines, shorts, times)',
    handler: async ({ deps, res, siteId, params }) => {
      const waveId = pathId(params.waveId, 'Wave');
      const wave = await getWaveRow(deps.db, waveId);
      if (!wave || wave.site_id !== siteId) throw notFound('Wave');
      const report = await buildWaveReport(deps.db, waveId);
      return sendAttachment(res, report.xlsx, XLSX_TYPE, report.filename);
    },
  }),
];
