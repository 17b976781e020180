/**
 * Who is signed in right now, and assigning a wave's waiting trips to the free ones: each free
 * signed-in picker gets the next waiting trip (trip order), longest-free first. A picker holds one
 * trip at a time, so a call assigns at most one trip per free picker; call again as trips finish.
 */
import type { Knex } from 'knex';
import type { Q } from '../db/knex';
import type { AutoAssignResult, SignedInPicker } from '../../shared/assign';
import { SESSION_MAX_S } from '../http/session';
import { notFound } from '../http/errors';
import { assignTrip } from './board.service';
import type { Actor } from './picking.service';
import * as repo from './picking.repository';

export async function signedInPickers(db: Q, siteId: number, nowMs = Date.now()): Promise<SignedInPicker[]> {
  const rows = await repo.signedInPickerRows(db, siteId, Math.floor(nowMs / 1000) - SESSION_MAX_S);
  const held = await repo.heldTripsOf(
    db,
    siteId,
    rows.map((r) => r.id),
  );
  return rows.map((r) => {
    const t = held.find((h) => h.picker_id === r.id);
    return { id: r.id, name: r.name, badge: r.badge, signedInAt: r.signed_in_at, tripId: t?.id ?? null, tripN: t?.n ?? null, waveId: t?.wave_id ?? null };
  });
}

export async function autoAssignWave(db: Knex, actor: Actor, siteId: number, waveId: number): Promise<AutoAssignResult> {
  if (!(await repo.getSiteWaveRow(db, siteId, waveId))) throw notFound('Wave');
  const waitingTrips = () => repo.waitingTripsOf(db, waveId);
  const trips = await waitingTrips();
  const free = (await signedInPickers(db, siteId)).filter((p) => p.tripId === null);
  const freedAt = await repo.lastFreedAt(
    db,
    free.map((p) => p.id),
  );
  free.sort((a, b) => (freedAt.get(a.id) ?? '').localeCompare(freedAt.get(b.id) ?? '') || a.id - b.id);
  const assigned: AutoAssignResult['assigned'] = [];
  for (let i = 0; i < Math.min(trips.length, free.length); i++) {
    await assignTrip(db, actor, siteId, trips[i]!.id, free[i]!.id);
    assigned.push({ tripId: trips[i]!.id, n: trips[i]!.n, pickerId: free[i]!.id, pickerName: free[i]!.name });
  }
  const waiting = (await waitingTrips()).length;
  let note: string | null = null;
  if (trips.length === 0) note = 'No trip of this wave is waiting for a picker.';
  else if (waiting > 0)
    note =
      free.length === 0
        ? 'No signed-in picker is free right now; trips wait until one finishes or signs in.'
        : `${waiting === 1 ? '1 trip' : `${waiting} trips`} still waiting: every signed-in picker has a trip.`;
  return { assigned, waiting, note };
}
