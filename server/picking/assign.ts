/**
 * Who is signed in right now, and assigning a wave's waiting trips to the free ones: each free
 * signed-in picker gets the next waiting trip (trip order), longest-free first. A picker holds one
 * trip at a time, so a call assigns at most one trip per free picker; call again as trips finish.
 */
import type { Knex } from 'knex';
import type { AutoAssignResult, SignedInPicker } from '../../shared/assign';
import { SESSION_MAX_S } from '../http/session';
import { notFound } from '../http/errors';
import { assignTrip } from './board.service';
import type { Actor } from './picking.service';

export async function signedInPickers(db: Knex, siteId: number, nowMs = Date.now()): Promise<SignedInPicker[]> {
  const since = Math.floor(nowMs / 1000) - SESSION_MAX_S;
  const rows: { id: number; name: string; badge: string | null; signed_in_at: string }[] = await db('sessions')
    .join('users', 'users.id', 'sessions.user_id')
    .join('user_sites', 'user_sites.user_id', 'users.id')
    .where({ 'users.role': 'picker', 'users.active': true, 'user_sites.site_id': siteId })
    .whereNull('sessions.revoked_at')
    .where('sessions.auth_time', '>=', since)
    .groupBy('users.id', 'users.name', 'users.badge')
    .orderBy('users.name')
    .select('users.id', 'users.name', 'users.badge')
    .max({ signed_in_at: 'sessions.created_at' });
  const held: { id: number; n: number; wave_id: number; picker_id: number }[] = await db('trips')
    .where({ site_id: siteId })
    .whereIn('status', ['assigned', 'picking'])
    .whereIn('picker_id', rows.map((r) => r.id))
    .select('id', 'n', 'wave_id', 'picker_id');
  return rows.map((r) => {
    const t = held.find((h) => h.picker_id === r.id);
    return { id: r.id, name: r.name, badge: r.badge, signedInAt: r.signed_in_at, tripId: t?.id ?? null, tripN: t?.n ?? null, waveId: t?.wave_id ?? null };
  });
}

/** When a picker last finished or dropped a trip (ISO), so the longest-free picker goes first; '' when never. */
async function lastFreedAt(db: Knex, pickerIds: number[]): Promise<Map<number, string>> {
  const rows: { picker_id: number; at: string | null }[] = await db('trips').whereIn('picker_id', pickerIds).groupBy('picker_id').select('picker_id').max({ at: 'finished_at' });
  return new Map(rows.map((r) => [r.picker_id, r.at ?? '']));
}

export async function autoAssignWave(db: Knex, actor: Actor, siteId: number, waveId: number): Promise<AutoAssignResult> {
  const wave = await db('waves').where({ id: waveId, site_id: siteId }).first<{ id: number } | undefined>('id');
  if (!wave) throw notFound('Wave');
  const waitingTrips = (): Promise<{ id: number; n: number }[]> => db('trips').where({ wave_id: waveId, status: 'released' }).whereNull('picker_id').orderBy('n').select('id', 'n');
  const trips = await waitingTrips();
  const free = (await signedInPickers(db, siteId)).filter((p) => p.tripId === null);
  const freedAt = await lastFreedAt(db, free.map((p) => p.id));
  free.sort((a, b) => (freedAt.get(a.id) ?? '').localeCompare(freedAt.get(b.id) ?? '') || a.id - b.id);
  const assigned: AutoAssignResult['assigned'] = [];
  for (let i = 0; i < Math.min(trips.length, free.length); i++) {
    await assignTrip(db, actor, siteId, trips[i]!.id, free[i]!.id);
    assigned.push({ tripId: trips[i]!.id, n: trips[i]!.n, pickerId: free[i]!.id, pickerName: free[i]!.name });
  }
  const waiting = (await waitingTrips()).length;
  let note: string | null = null;
  if (trips.length === 0) note = 'No trip of this wave is waiting for a picker.';
  else if (waiting > 0) note = free.length === 0 ? 'No signed-in picker is free right now; trips wait until one finishes or signs in.' : `${waiting === 1 ? '1 trip' : `${waiting} trips`} still waiting: every signed-in picker has a trip.`;
  return { assigned, waiting, note };
}
