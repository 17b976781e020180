/** Typed calls for the picker's tablet and the supervisor's live board (shared/picking.ts). */
import { z } from 'zod';
import { Ok } from '@shared/common';
import {
  Board,
  CancelResult,
  CloseWaveResult,
  CurrentTrip,
  LineAnswer,
  PickAnswer,
  PickTrip,
  ReplenishmentItem,
  ShortFollowUpResult,
  TripPlan,
  TripPulse,
  TripResult,
  type CartReadyBody,
  type ReplenishmentQuery,
  type ShortReason,
} from '@shared/picking';
import { ApiError, badResponse, errorFromAnswer, http, networkError, parseJsonText } from './http';

export const currentTrip = (siteId: number) => http('GET', `/api/sites/${siteId}/picking/current`, CurrentTrip);
export const takeNextTrip = (siteId: number) => http('POST', `/api/sites/${siteId}/picking/next`, CurrentTrip);
export const getTrip = (tripId: number) => http('GET', `/api/picking/trips/${tripId}`, PickTrip);
export const getTripPulse = (tripId: number) => http('GET', `/api/picking/trips/${tripId}/status`, TripPulse);
export const getTripPlan = (tripId: number) => http('GET', `/api/picking/trips/${tripId}/plan`, TripPlan);
export const startTrip = (tripId: number) => http('POST', `/api/picking/trips/${tripId}/start`, PickTrip);
export const cartReady = (tripId: number, body: CartReadyBody) => http('POST', `/api/picking/trips/${tripId}/cart-ready`, PickTrip, { body });
export const getTripResult = (tripId: number) => http('GET', `/api/picking/trips/${tripId}/result`, TripResult);

/** One queued picker write: what the offline queue stores and replays with the same key. */
export type PickAction =
  | { kind: 'confirm'; tripId: number; lineId: number; body: { via: 'scan' | 'tap'; scan: string | null; pickedAt: string; stopN?: number } }
  | { kind: 'short'; tripId: number; lineId: number; body: { qtyFound: number; reason: ShortReason; pickedAt: string } }
  | { kind: 'undo'; tripId: number; lineId: number; body: Record<string, never> }
  | { kind: 'skip'; tripId: number; stopId: number; body: { pickedAt: string } }
  | { kind: 'finish'; tripId: number; body: Record<string, never> };

export function actionPath(a: PickAction): string {
  const base = `/api/picking/trips/${a.tripId}`;
  switch (a.kind) {
    case 'confirm':
      return `${base}/lines/${a.lineId}/confirm`;
    case 'short':
      return `${base}/lines/${a.lineId}/short`;
    case 'undo':
      return `${base}/lines/${a.lineId}/undo`;
    case 'skip':
      return `${base}/stops/${a.stopId}/skip`;
    case 'finish':
      return `${base}/finish`;
  }
}

export type SendOutcome =
  { ok: true; answer: z.infer<typeof LineAnswer> | z.infer<typeof PickAnswer> | z.infer<typeof TripResult> } | { ok: false; error: ApiError };

/**
 * Sends one picker write with its idempotency key. Not through `http`: the key and device headers
 * are per request, and a network failure must come back as a value the queue can keep.
 */
export async function sendAction(a: PickAction, key: string, device: string, fetchFn: typeof fetch = globalThis.fetch): Promise<SendOutcome> {
  let response: Response;
  try {
    response = await fetchFn(actionPath(a), {
      method: 'POST',
      credentials: 'same-origin',
      headers: { accept: 'application/json', 'content-type': 'application/json', 'x-aislewright': '1', 'idempotency-key': key, 'x-aislewright-device': device },
      body: JSON.stringify(a.body),
    });
  } catch {
    return { ok: false, error: networkError() };
  }
  const json = parseJsonText(await response.text().catch(() => ''));
  if (!response.ok) return { ok: false, error: errorFromAnswer(response.status, response.statusText, json) };
  const parsed = (a.kind === 'finish' ? TripResult : a.kind === 'skip' ? PickAnswer : LineAnswer).safeParse(json);
  if (!parsed.success) return { ok: false, error: badResponse('POST', actionPath(a), response.status, parsed.error.issues) };
  return { ok: true, answer: parsed.data };
}

// ---- live board ----
export const getBoard = (siteId: number) => http('GET', `/api/sites/${siteId}/board`, Board);
export const boardEventsUrl = (siteId: number) => `/api/sites/${siteId}/board/events`;
export const assignTrip = (siteId: number, tripId: number, pickerId: number) =>
  http('POST', `/api/sites/${siteId}/board/trips/${tripId}/assign`, Ok, { body: { pickerId } });
export const cancelTrip = (siteId: number, tripId: number, reason?: string) =>
  http('POST', `/api/sites/${siteId}/board/trips/${tripId}/cancel`, CancelResult, { body: reason ? { reason } : {} });
export const closeWave = (siteId: number, waveId: number, reason?: string) =>
  http('POST', `/api/sites/${siteId}/board/waves/${waveId}/close`, CloseWaveResult, { body: reason ? { reason } : {} });
export const reopenLine = (siteId: number, lineId: number, reason: string) =>
  http('POST', `/api/sites/${siteId}/board/lines/${lineId}/reopen`, LineAnswer, { body: { reason } });
export const markShortHandled = (siteId: number, shortId: number) => http('POST', `/api/sites/${siteId}/board/shorts/${shortId}/handled`, Ok, { body: {} });
/** Re-pick in a later wave (a new open order) or send to the replenishment list. */
export const followUpShort = (siteId: number, shortId: number, followUp: 'repick' | 'replenish') =>
  http('POST', `/api/sites/${siteId}/board/shorts/${shortId}/${followUp}`, ShortFollowUpResult, { body: {} });

// ---- replenishment list ----
export const getReplenishment = (siteId: number, show: ReplenishmentQuery['show']) =>
  http('GET', `/api/sites/${siteId}/replenishment?show=${show}`, z.array(ReplenishmentItem));
export const markRestocked = (siteId: number, shortId: number) => http('POST', `/api/sites/${siteId}/replenishment/${shortId}/restocked`, Ok, { body: {} });
/** A plain download: the browser keeps the session cookie on a same-origin link. */
export const replenishmentExportUrl = (siteId: number, format: 'xlsx' | 'csv', show: ReplenishmentQuery['show']) =>
  `/api/sites/${siteId}/replenishment/export?format=${format}&show=${show}`;
export const waveReportUrl = (siteId: number, waveId: number) => `/api/sites/${siteId}/board/waves/${waveId}/report.xlsx`;
