/**
 * The picker's trip, apart from its screen: which phase the tablet is in, the trip as the server last
 * told it with the queued writes laid over it, the queue itself, the 5-second poll, the screen wake
 * lock and the notices. PickTripView draws it; every wording of a notice lives in ./notices.
 */
import { computed, markRaw, onMounted, ref, shallowRef, watch } from 'vue';
import { useIntervalFn, useOnline, useTimeoutFn, useWakeLock } from '@vueuse/core';
import { UNDO_WINDOW_MS, type PickTrip, type ShortReason, type TripPlan, type TripResult } from '@shared/picking';
import { ApiError } from '@client/api/http';
import * as api from '@client/api/picking';
import { describeError } from '@client/composables/useAsync';
import { useSessionStore } from '@client/stores/session';
import { needsCartSetup } from './cart-setup';
import { deviceName } from './device';
import { REASSIGNED, refusalNotice, routeChangeNotice, type Notice } from './notices';
import { PickQueue, type QueuedAction } from './offline-queue';
import { clearTrip, loadTrip, saveTrip } from './trip-cache';
import { applyPending, mergeLineAnswer, progressOf, supersedes } from './trip-view';

/** The tablet asks for its trip this often while online with nothing queued (reassignments, cancels). */
const POLL_MS = 5000;
/** Taps are held this long after the line on screen changes, so a double tap confirms one line only. */
const TAP_GUARD_MS = 500;
/** The Undo button shows this long after a confirmation (the server allows UNDO_WINDOW_MS after receiving it). */
const UNDO_SHOW_MS = Math.min(8000, UNDO_WINDOW_MS);

export type PickPhase = 'loading' | 'idle' | 'start' | 'cart' | 'picking' | 'summary';
const TRIP_OPEN: readonly PickPhase[] = ['picking', 'start', 'cart'];

export function usePickTrip() {
  const session = useSessionStore();
  const device = deviceName();

  const phase = ref<PickPhase>('loading');
  const serverTrip = shallowRef<PickTrip | null>(null);
  const pending = shallowRef<readonly QueuedAction[]>([]);
  const plan = shallowRef<TripPlan | null>(null);
  const result = shallowRef<TripResult | null>(null);
  const released = ref(0);
  const browserOnline = useOnline();
  /** Reachability as the last send, poll or browser event found it. */
  const online = ref(browserOnline.value);
  /** The trip on screen came from this tablet's copy: the server could not be reached at load. */
  const fromDevice = ref(false);
  const busy = ref(false);
  const notice = ref<Notice | null>(null);
  /** Shown with the Undo button for a few seconds after a confirmation or short. */
  const lastDone = ref<{ tripId: number; lineId: number; text: string } | null>(null);
  const guarded = ref(false);
  /** The line on screen when the finger went down on Confirm. */
  let downOn: { lineId: number; stopN: number; at: number } | null = null;

  const trip = computed(() => (serverTrip.value ? applyPending(serverTrip.value, pending.value) : null));
  const progress = computed(() => (trip.value ? progressOf(trip.value) : null));
  const currentStop = computed(() => trip.value?.stopList.find((s) => s.id === trip.value?.currentStopId) ?? null);
  const currentLine = computed(() => currentStop.value?.lines.find((l) => l.status === 'open') ?? null);
  const currentIndex = computed(() => (trip.value && currentStop.value ? trip.value.stopList.indexOf(currentStop.value) + 1 : 0));
  const openStops = computed(() => trip.value?.stopList.filter((s) => s.status === 'open' && s.lines.some((l) => l.status === 'open')).length ?? 0);
  const waitingFinish = computed(() => pending.value.some((p) => p.action.kind === 'finish'));

  const guard = useTimeoutFn(() => (guarded.value = false), TAP_GUARD_MS, { immediate: false });
  watch(
    () => currentLine.value?.id,
    () => {
      // Every advance holds taps for a moment: the next line must be seen before it can be confirmed.
      guarded.value = true;
      downOn = null;
      guard.start();
    },
  );

  let seenRoute: { tripId: number; at: string | null } | null = null;
  let routeNoticeShown = false;
  watch(serverTrip, (t) => {
    if (!t) return;
    const said = routeChangeNotice(t, seenRoute);
    seenRoute = { tripId: t.id, at: t.routeChangedAt };
    if (!said) return;
    notice.value = said;
    routeNoticeShown = true;
  });

  // This tablet's copy of the open trip and its map, for a reload with no network.
  watch([serverTrip, plan], ([t, p]) => {
    const userId = session.me?.id;
    const siteId = session.siteId;
    if (!userId || !siteId) return;
    if (!t || t.status === 'done' || t.status === 'cancelled') void clearTrip();
    else void saveTrip({ userId, siteId, trip: t, plan: p });
  });

  const queue = new PickQueue((action, key) => api.sendAction(action, key, device), {
    answered(_item, answer) {
      if ('line' in answer) {
        if (serverTrip.value) serverTrip.value = mergeLineAnswer(serverTrip.value, answer);
      } else if ('trip' in answer) {
        if (serverTrip.value && answer.trip.id === serverTrip.value.id && supersedes(answer.trip, serverTrip.value)) serverTrip.value = answer.trip;
      } else {
        result.value = answer;
        phase.value = 'summary';
        // Notices about the trip's route no longer apply once it is done.
        if (routeNoticeShown) notice.value = null;
      }
      pending.value = queue.pending;
    },
    refused(item, error) {
      pending.value = queue.pending;
      notice.value = refusalNotice(error);
      void refresh(item.action.tripId);
    },
    reachability(up) {
      online.value = up;
    },
  });

  function enqueue(action: api.PickAction): void {
    void queue.enqueue(action).then(() => {
      pending.value = queue.pending;
    });
    pending.value = [...queue.pending];
  }

  function flush(): Promise<void> {
    return queue.flush().then(() => {
      pending.value = queue.pending;
    });
  }

  async function loadPlan(tripId: number): Promise<void> {
    if (plan.value && serverTrip.value?.id === tripId) return;
    try {
      plan.value = markRaw(await api.getTripPlan(tripId));
    } catch {
      // The map is a help, not a need: the stop card and list carry the route. Offline, the tablet's copy stays.
      if (!fromDevice.value) plan.value = null;
    }
  }

  function show(t: PickTrip | null): void {
    const changedTrip = t?.id !== serverTrip.value?.id;
    if (changedTrip) plan.value = null;
    serverTrip.value = t;
    if (!t) {
      phase.value = 'idle';
      return;
    }
    void loadPlan(t.id);
    if (t.status === 'done' || t.status === 'cancelled') {
      if (t.status === 'cancelled') notice.value = { tone: 'problem', text: `Trip ${t.n} was cancelled by your supervisor. Take the cart back to the depot.` };
      phase.value = 'idle';
      serverTrip.value = null;
      return;
    }
    phase.value = t.status === 'assigned' ? 'start' : needsCartSetup(applyPending(t, pending.value)) ? 'cart' : 'picking';
  }

  async function loadHome(): Promise<void> {
    const siteId = session.siteId;
    if (!siteId) return;
    let answer;
    try {
      answer = await api.currentTrip(siteId);
    } catch (e) {
      // No network at load (a reload in a Wi-Fi gap): the trip this tablet held, with its queued picks.
      const saved = e instanceof ApiError && e.status === 0 && session.me ? await loadTrip(session.me.id, siteId) : null;
      if (!saved) throw e;
      online.value = false;
      fromDevice.value = true;
      serverTrip.value = null;
      show(saved.trip);
      plan.value = saved.plan ? markRaw(saved.plan) : null;
      return;
    }
    fromDevice.value = false;
    released.value = answer.releasedTrips;
    show(answer.trip);
  }

  async function refresh(tripId: number): Promise<void> {
    try {
      const t = await api.getTrip(tripId);
      // Writes answered while this read was on its way are newer than it: keep them.
      if (!supersedes(t, serverTrip.value)) return;
      if (TRIP_OPEN.includes(phase.value)) show(t);
      else serverTrip.value = t;
    } catch (e) {
      if (e instanceof ApiError && e.status === 403) {
        notice.value = REASSIGNED;
        serverTrip.value = null;
        phase.value = 'idle';
        await loadHome().catch(() => undefined);
      }
    }
  }

  /** The 5-second poll reads one row; the whole trip is read again only when something changed. */
  async function pollPulse(t: PickTrip): Promise<void> {
    try {
      const pulse = await api.getTripPulse(t.id);
      online.value = true;
      // A pulse read before a confirmation's answer arrived is older than the tablet, not news.
      const held = serverTrip.value;
      if (!held || pulse.id !== held.id) return;
      if (pulse.revision > held.revision || pulse.status !== held.status) await refresh(t.id);
    } catch (e) {
      if (e instanceof ApiError && e.status === 403) await refresh(t.id);
      else if (e instanceof ApiError && e.status === 0) online.value = false;
    }
  }

  /** Runs one call to the server with `busy` set; a failure becomes a problem notice. */
  async function withBusy(
    call: () => Promise<void>,
    failed: (e: unknown) => void = (e) => (notice.value = { tone: 'problem', text: describeError(e) }),
  ): Promise<void> {
    if (busy.value) return;
    busy.value = true;
    try {
      await call();
    } catch (e) {
      failed(e);
    } finally {
      busy.value = false;
    }
  }

  function takeNext(): Promise<void> {
    const siteId = session.siteId;
    if (!siteId || busy.value) return Promise.resolve();
    notice.value = null;
    return withBusy(async () => {
      const answer = await api.takeNextTrip(siteId);
      released.value = answer.releasedTrips;
      result.value = null;
      show(answer.trip);
      if (!answer.trip) notice.value = { tone: 'info', text: 'No released trip is waiting. Ask your supervisor, or try again in a moment.' };
    });
  }

  function startTrip(): Promise<void> {
    const t = serverTrip.value;
    if (!t) return Promise.resolve();
    return withBusy(async () => show(await api.startTrip(t.id)));
  }

  /** Cart set-up done: stored on the server (with its audit entry) so a reload does not ask again. */
  function cartReady(totes: { tote: number; via: 'scan' | 'tap' }[]): Promise<void> {
    const t = serverTrip.value;
    if (!t) return Promise.resolve();
    return withBusy(
      async () => {
        show(await api.cartReady(t.id, { totes }));
        if (notice.value?.tone === 'info') notice.value = null;
      },
      (e) => {
        if (e instanceof ApiError && e.status === 0) {
          // No network: picking goes on (writes queue on the tablet); the set-up is asked again only after a reload.
          online.value = false;
          phase.value = 'picking';
          notice.value = { tone: 'info', text: 'Cart set-up not saved (no connection). Start picking; the totes are as on the pick list.' };
        } else {
          notice.value = { tone: 'problem', text: `Not saved: ${describeError(e)}` };
        }
      },
    );
  }

  const now = () => new Date().toISOString();

  const undoShown = useTimeoutFn(() => (lastDone.value = null), UNDO_SHOW_MS, { immediate: false });
  function offerUndo(tripId: number, lineId: number, text: string): void {
    lastDone.value = { tripId, lineId, text };
    undoShown.start();
  }

  function confirmLine(via: 'scan' | 'tap', scan: string | null): void {
    const t = trip.value;
    const stop = currentStop.value;
    const line = currentLine.value;
    if (!t || !line || !stop) return;
    if (via === 'tap') {
      // Only the line that was on screen when the finger went down; none while taps are held.
      const shown = downOn;
      downOn = null;
      if (guarded.value || !shown || shown.lineId !== line.id || Date.now() - shown.at > 10_000) return;
    }
    // A refused write ("Not saved: …") stays until the picker taps OK; only information clears itself.
    if (notice.value?.tone === 'info') notice.value = null;
    enqueue({ kind: 'confirm', tripId: t.id, lineId: line.id, body: { via, scan, pickedAt: now(), stopN: stop.n } });
    offerUndo(t.id, line.id, `Stop ${stop.n}: ${line.qty} × ${line.sku} confirmed.`);
  }

  /** The finger went down on Confirm: remember which line was on screen. */
  function confirmDown(): void {
    const stop = currentStop.value;
    const line = currentLine.value;
    downOn = !guarded.value && stop && line ? { lineId: line.id, stopN: stop.n, at: Date.now() } : null;
  }

  function undoLast(): void {
    const last = lastDone.value;
    lastDone.value = null;
    if (!last) return;
    enqueue({ kind: 'undo', tripId: last.tripId, lineId: last.lineId, body: {} });
    notice.value = { tone: 'info', text: 'Undone: the line is open again.' };
  }

  function cannotReach(): void {
    const t = trip.value;
    const stop = currentStop.value;
    if (!t || !stop) return;
    for (const l of stop.lines) {
      if (l.status === 'open') enqueue({ kind: 'short', tripId: t.id, lineId: l.id, body: { qtyFound: 0, reason: 'cannot_reach', pickedAt: now() } });
    }
  }

  function reportShort(qtyFound: number, reason: ShortReason): void {
    const t = trip.value;
    const line = currentLine.value;
    if (!t || !line) return;
    enqueue({ kind: 'short', tripId: t.id, lineId: line.id, body: { qtyFound, reason, pickedAt: now() } });
    offerUndo(t.id, line.id, `${line.sku} reported short (${qtyFound} of ${line.qty} found).`);
  }

  function skipStop(): void {
    const t = trip.value;
    const stop = currentStop.value;
    if (!t || !stop) return;
    enqueue({ kind: 'skip', tripId: t.id, stopId: stop.id, body: { pickedAt: now() } });
  }

  function returnToDepot(): void {
    const t = trip.value;
    if (!t || waitingFinish.value) return;
    enqueue({ kind: 'finish', tripId: t.id, body: {} });
  }

  // Back online: send what waits; a trip shown from this tablet's copy is read from the server again.
  watch(browserOnline, (up) => {
    online.value = up;
    if (!up) return;
    void flush().then(async () => {
      if (fromDevice.value && queue.pending.length === 0) {
        fromDevice.value = false;
        await loadHome().catch(() => undefined);
      }
    });
  });

  // The screen stays on while a trip is open; the lock goes when the trip does.
  const wakeLock = useWakeLock();
  watch(phase, (p) => {
    if (!wakeLock.isSupported.value) return;
    if (TRIP_OPEN.includes(p)) {
      if (!wakeLock.sentinel.value) void wakeLock.request('screen').catch(() => undefined);
    } else void wakeLock.release().catch(() => undefined);
  });

  const poll = useIntervalFn(
    () => {
      if (queue.pending.length > 0) {
        void flush();
        return;
      }
      const t = serverTrip.value;
      if (t && online.value && TRIP_OPEN.includes(phase.value)) void pollPulse(t);
    },
    POLL_MS,
    { immediate: false },
  );

  onMounted(async () => {
    pending.value = await queue.load();
    try {
      await loadHome();
    } catch (e) {
      notice.value = { tone: 'problem', text: describeError(e) };
      phase.value = 'idle';
    }
    void flush();
    poll.resume();
  });

  // Read by PickTripView; every piece of the trip a screen needs, and the actions it calls.
  return {
    phase,
    trip,
    pending,
    plan,
    result,
    released,
    online,
    busy,
    notice,
    lastDone,
    guarded,
    progress,
    currentStop,
    currentLine,
    currentIndex,
    openStops,
    waitingFinish,
    takeNext,
    startTrip,
    cartReady,
    confirmLine,
    confirmDown,
    undoLast,
    cannotReach,
    reportShort,
    skipStop,
    returnToDepot,
  };
}
