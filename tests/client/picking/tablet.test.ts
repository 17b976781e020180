/** The tablet's pure parts: queued writes shown at once, answers merged, scans compared, the queue's resend rules. */
import { describe, expect, it, vi } from 'vitest';
import type { PickTrip } from '@shared/picking';
import { contrast, DARK, LIGHT } from '@client/adapters/palette';
import { sendAction, type PickAction } from '@client/api/picking';
import { applyPending, mergeLineAnswer, progressOf, scanMatches, supersedes } from '@client/views/picking/trip-view';
import { cartTotes, needsCartSetup, toteFromScan } from '@client/views/picking/cart-setup';
import { pickLine, pickStop, pickTrip } from '../../helpers/pick-trip';

const store = new Map<string, unknown>();
vi.mock('idb-keyval', () => ({
  createStore: () => 'store',
  get: async (k: string) => store.get(k),
  set: async (k: string, v: unknown) => void store.set(k, structuredClone(v)),
}));
const { PickQueue, isRetryable, newIdempotencyKey } = await import('@client/views/picking/offline-queue');

const line = (id: number, bin: string) => pickLine(id, bin, { qty: 2 });
function trip(): PickTrip {
  return pickTrip([pickStop(1, 0, [line(11, 'A-01'), line(12, 'A-01')]), pickStop(2, 5, [line(21, 'A-02')]), pickStop(3, 9, [line(31, 'A-03')])]);
}
const queued = (action: PickAction) => ({ key: newIdempotencyKey(), action, queuedAt: '2026-12-02T04:00:00Z' });
const at = '2026-12-02T04:00:00Z';

describe('applyPending', () => {
  it('shows queued confirmations and shorts at once, and moves to the next stop when one is done', () => {
    const view = applyPending(trip(), [
      queued({ kind: 'confirm', tripId: 9, lineId: 11, body: { via: 'scan', scan: 'A-01', pickedAt: at } }),
      queued({ kind: 'short', tripId: 9, lineId: 12, body: { qtyFound: 1, reason: 'damaged', pickedAt: at } }),
    ]);
    expect(view.stopList[0]!.status).toBe('done');
    expect(view.stopList[0]!.lines.map((l) => l.status)).toEqual(['picked', 'short']);
    expect(view.currentStopId).toBe(2);
    expect(progressOf(view)).toEqual({ stopsDone: 1, linesDone: 2, lines: 4, shorts: 1 });
  });

  it('puts a stop skipped offline at the end until the server re-sequences, keeping its printed number', () => {
    const view = applyPending(trip(), [queued({ kind: 'skip', tripId: 9, stopId: 1, body: { pickedAt: at } })]);
    expect(view.stopList.map((s) => [s.id, s.n, s.skipped])).toEqual([
      [2, 2, false],
      [3, 3, false],
      [1, 1, true],
    ]);
    expect(view.currentStopId).toBe(2);
  });

  it('ignores writes for another trip and lines already done on the server', () => {
    const t = trip();
    t.stopList[0]!.lines[0]!.status = 'picked';
    const view = applyPending(t, [
      queued({ kind: 'short', tripId: 9, lineId: 11, body: { qtyFound: 0, reason: 'empty_bin', pickedAt: at } }),
      queued({ kind: 'confirm', tripId: 8, lineId: 12, body: { via: 'tap', scan: null, pickedAt: at } }),
    ]);
    expect(view.stopList[0]!.lines.map((l) => l.status)).toEqual(['picked', 'open']);
  });
});

describe('mergeLineAnswer', () => {
  it('reopens a line undone while the undo is still queued', () => {
    const view = applyPending(trip(), [
      queued({ kind: 'confirm', tripId: 9, lineId: 21, body: { via: 'tap', scan: null, pickedAt: at } }),
      queued({ kind: 'undo', tripId: 9, lineId: 21, body: {} }),
    ]);
    expect(view.stopList[1]!.lines[0]!.status).toBe('open');
    expect(view.stopList[1]!.status).toBe('open');
  });

  it('prefers a reachable stop over a cut-off one as the current stop', () => {
    const t = trip();
    t.stopList[0]!.cutOff = true;
    expect(applyPending(t, [queued({ kind: 'confirm', tripId: 9, lineId: 21, body: { via: 'tap', scan: null, pickedAt: at } })]).currentStopId).toBe(3);
  });

  it('takes the line, the stop status and the higher revision from the answer', () => {
    const merged = mergeLineAnswer(trip(), {
      tripId: 9,
      tripStatus: 'picking',
      revision: 7,
      line: { ...line(21, 'A-02'), status: 'picked', pickedQty: 2 },
      stop: { id: 2, status: 'done' },
    });
    expect(merged.stopList[1]!.status).toBe('done');
    expect(merged.stopList[1]!.lines[0]!.status).toBe('picked');
    expect(merged.revision).toBe(7);
    expect(merged.currentStopId).toBe(1);
  });
});

describe('supersedes', () => {
  it('keeps a confirmation answered after a trip read left the server when the read comes back late', () => {
    const read = trip();
    const held = mergeLineAnswer(trip(), {
      tripId: 9,
      tripStatus: 'picking',
      revision: 4,
      line: { ...line(11, 'A-01'), status: 'picked', pickedQty: 2 },
      stop: { id: 1, status: 'open' },
    });
    expect(supersedes(read, held)).toBe(false);
    expect(progressOf(held).linesDone).toBe(1);
    expect(supersedes({ ...read, revision: 4 }, held)).toBe(true);
    expect(supersedes({ ...read, revision: 5 }, held)).toBe(true);
  });
  it('takes any read when the tablet holds no trip or another one', () => {
    expect(supersedes(trip(), null)).toBe(true);
    expect(supersedes({ id: 10, revision: 1 }, trip())).toBe(true);
  });
});

describe('scans', () => {
  it('match whatever the case and padding, and only the same code', () => {
    expect(scanMatches(' c-07-03-2\n', 'C-07-03-2')).toBe(true);
    expect(scanMatches('C-07-03-3', 'C-07-03-2')).toBe(false);
  });
});

describe('the offline queue', () => {
  it('hands over an answer in the same step that takes its write off the queue', async () => {
    store.clear();
    const seen: { pendingHasIt: boolean; storedHasIt: boolean }[] = [];
    const q = new PickQueue(
      async () => ({
        ok: true,
        answer: {
          tripId: 9,
          tripStatus: 'picking',
          revision: 4,
          line: { ...line(11, 'A-01'), status: 'picked', pickedQty: 2 },
          stop: { id: 1, status: 'open' },
        },
      }),
      {
        answered: (item) =>
          seen.push({
            pendingHasIt: q.pending.some((i) => i.key === item.key),
            storedHasIt: ((store.get('items') as { key: string }[] | undefined) ?? []).some((i) => i.key === item.key),
          }),
        refused: () => undefined,
        reachability: () => undefined,
      },
    );
    await q.load();
    await q.enqueue({ kind: 'confirm', tripId: 9, lineId: 11, body: { via: 'scan', scan: 'A-01', pickedAt: at } });
    await q.flush();
    // Off the queue the screen already sees, still in the store until the answer is merged (a crash resends it under its key).
    expect(seen).toEqual([{ pendingHasIt: false, storedHasIt: true }]);
    expect(store.get('items')).toEqual([]);
  });
  it('keeps writes through a network failure and sends each once, with the same key, when it is back', async () => {
    store.clear();
    const sent: string[] = [];
    let up = false;
    const answered: number[] = [];
    const q = new PickQueue(
      async (action, key) => {
        sent.push(key);
        if (!up) return { ok: false, error: { status: 0, code: 'network' } as never };
        return {
          ok: true,
          answer: { tripId: 9, tripStatus: 'picking', revision: 1, line: line((action as { lineId: number }).lineId, 'A'), stop: { id: 1, status: 'open' } },
        };
      },
      { answered: (_i, a) => answered.push((a as { line: { id: number } }).line.id), refused: () => undefined, reachability: () => undefined },
    );
    await q.load();
    const a = await q.enqueue({ kind: 'confirm', tripId: 9, lineId: 11, body: { via: 'tap', scan: null, pickedAt: at } });
    const b = await q.enqueue({ kind: 'confirm', tripId: 9, lineId: 12, body: { via: 'tap', scan: null, pickedAt: at } });
    await q.flush();
    expect(q.pending).toHaveLength(2);
    // Kept on the device: a reload finds both.
    const reloaded = new PickQueue(async () => ({ ok: false, error: { status: 0 } as never }), {
      answered: () => undefined,
      refused: () => undefined,
      reachability: () => undefined,
    });
    expect((await reloaded.load()).map((i) => i.key)).toEqual([a.key, b.key]);
    up = true;
    await q.flush();
    expect(q.pending).toHaveLength(0);
    expect(answered).toEqual([11, 12]);
    // Every send of a write carried its own key, resends the same one.
    expect(new Set(sent.filter((k) => k === a.key)).size).toBe(1);
    expect(sent.slice(-2)).toEqual([a.key, b.key]);
  });

  it('retries only network trouble and server errors; conflicts are final', () => {
    expect(isRetryable({ status: 0, code: 'network' } as never)).toBe(true);
    expect(isRetryable({ status: 503, code: 'x' } as never)).toBe(true);
    expect(isRetryable({ status: 409, code: 'already_confirmed' } as never)).toBe(false);
    expect(isRetryable({ status: 422, code: 'idempotency_key_reused' } as never)).toBe(false);
    expect(newIdempotencyKey()).toMatch(/^[0-9a-f]{32}$/);
  });
});

describe('sendAction', () => {
  it('sends the key, the device and the CSRF header, and reports a dropped network as status 0', async () => {
    const fetchFn = vi.fn(
      async () => new Response(JSON.stringify({ error: { code: 'already_confirmed', message: 'x', details: { by: 'Robin' } } }), { status: 409 }),
    );
    const out = await sendAction(
      { kind: 'confirm', tripId: 9, lineId: 11, body: { via: 'tap', scan: null, pickedAt: at } },
      'key-123456789',
      'tablet-1',
      fetchFn as unknown as typeof fetch,
    );
    const init = (fetchFn.mock.calls[0] as unknown as [string, RequestInit])[1];
    expect((fetchFn.mock.calls[0] as unknown as [string])[0]).toBe('/api/picking/trips/9/lines/11/confirm');
    expect(init.headers).toMatchObject({ 'idempotency-key': 'key-123456789', 'x-aislewright-device': 'tablet-1', 'x-aislewright': '1' });
    expect(out.ok).toBe(false);
    if (!out.ok) expect([out.error.status, out.error.code]).toEqual([409, 'already_confirmed']);
    const offline = await sendAction({ kind: 'finish', tripId: 9, body: {} }, 'key-123456789', 'tablet-1', (async () => {
      throw new TypeError('Failed to fetch');
    }) as unknown as typeof fetch);
    expect(!offline.ok && offline.error.status).toBe(0);
  });
});

describe('wrong-scan colours', () => {
  // WCAG 2.1 contrast (1.4.6 AAA, 7:1), the formula in client/adapters/palette.ts.
  it('hold 7:1 in light and dark', () => {
    expect(contrast('#5C0F08', '#FDECEA')).toBeGreaterThanOrEqual(7);
    expect(contrast('#FFE1DC', '#3A1512')).toBeGreaterThanOrEqual(7);
    // Text on the picker's own surfaces and buttons.
    for (const p of [LIGHT, DARK]) {
      expect(contrast(p.text1, p.surface)).toBeGreaterThanOrEqual(7);
      expect(contrast(p.onAction, p.action)).toBeGreaterThanOrEqual(7);
      expect(contrast(p.cautionText, p.cautionBg)).toBeGreaterThanOrEqual(7);
      expect(contrast(p.text1, p.body)).toBeGreaterThanOrEqual(7);
    }
  });
});

describe('cart set-up (issue 16)', () => {
  it('lists each tote with its orders by tote number, as the printed pick list does', () => {
    const t = {
      stopList: [
        {
          lines: [
            { tote: 2, orderRef: 'WEB-2' },
            { tote: 1, orderRef: 'WEB-1' },
          ],
        },
        {
          lines: [
            { tote: 2, orderRef: 'WEB-2' },
            { tote: 10, orderRef: 'WEB-9' },
          ],
        },
      ],
    } as unknown as PickTrip;
    expect(cartTotes(t)).toEqual([
      { tote: 1, orders: ['WEB-1'] },
      { tote: 2, orders: ['WEB-2'] },
      { tote: 10, orders: ['WEB-9'] },
    ]);
  });

  it('reads a tote number from the label forms scanners send, and nothing else', () => {
    expect(['3', 'T3', 't-03', 'TOTE 3', ' Tote-3 \n'].map(toteFromScan)).toEqual([3, 3, 3, 3, 3]);
    expect(['', 'A-04-01-1', 'BW-1006', 'T', '0', 'T3X', '3.5'].map(toteFromScan)).toEqual([null, null, null, null, null, null, null]);
  });

  it('asks for the set-up only on a started trip with no confirmation stored and no line worked', () => {
    const line = (status: string) => ({ tote: 1, orderRef: 'W', status });
    const trip = (over: object) =>
      ({ status: 'picking', cartReadyAt: null, stopList: [{ lines: [line('open'), line('open')] }], ...over }) as unknown as PickTrip;
    expect(needsCartSetup(trip({}))).toBe(true);
    expect(needsCartSetup(trip({ cartReadyAt: '2026-12-05T02:00:00Z' }))).toBe(false);
    expect(needsCartSetup(trip({ status: 'assigned' }))).toBe(false);
    // A trip already under way (opened before this step existed, or on another tablet) is not stopped.
    expect(needsCartSetup(trip({ stopList: [{ lines: [line('picked'), line('open')] }] }))).toBe(false);
  });
});
