import { expect, type APIRequestContext } from '@playwright/test';

export interface ReleasedTrip {
  siteId: number;
  tripId: number;
  lines: number;
  stops: number;
  waveName: string;
  waveId: number;
}

/**
 * Through the supervisor's API: plans a wave (first come, first served) of the first `orders` open orders of
 * the first site on its first cart profile, releases it as `waveName` (its release key `<keyPrefix>-<job>`),
 * and gives its longest trip — by lines or by stops — to the picker named `pickerName`.
 */
export async function releaseTripTo(
  api: APIRequestContext,
  opts: { orders: number; pickerName: string; keyPrefix: string; waveName: string; longestBy: 'lines' | 'stops' },
): Promise<ReleasedTrip> {
  const sites = (await (await api.get('/api/sites')).json()) as { id: number; cartProfiles: { id: number }[] }[];
  const site = sites[0]!;
  const page = (await (await api.get(`/api/sites/${site.id}/orders?status=open&pageSize=${opts.orders}`)).json()) as { rows: { id: number }[] };
  const orderIds = page.rows.slice(0, opts.orders).map((o) => o.id);
  expect(orderIds).toHaveLength(opts.orders);
  let job = (await (
    await api.post(`/api/sites/${site.id}/wave-previews`, { data: { orderIds, cartProfileId: site.cartProfiles[0]!.id, batching: 'fcfs' } })
  ).json()) as { id: string; state: string };
  for (let i = 0; i < 300 && job.state === 'running'; i++) {
    await new Promise((r) => setTimeout(r, 200));
    job = (await (await api.get(`/api/sites/${site.id}/wave-previews/${job.id}`)).json()) as typeof job;
  }
  expect(job.state).toBe('done');
  const released = await api.post(`/api/sites/${site.id}/waves`, {
    data: { previewId: job.id, releaseKey: `${opts.keyPrefix}-${job.id}`, name: opts.waveName },
  });
  expect(released.status()).toBe(201);
  const wave = (await released.json()) as { id: number; tripList: { id: number; lines: number; stops: number }[] };
  const trip = [...wave.tripList].sort((a, b) => b[opts.longestBy] - a[opts.longestBy])[0]!;
  const board = (await (await api.get(`/api/sites/${site.id}/board`)).json()) as { pickers: { id: number; name: string }[] };
  const picker = board.pickers.find((p) => p.name === opts.pickerName)!;
  const assigned = await api.post(`/api/sites/${site.id}/board/trips/${trip.id}/assign`, { data: { pickerId: picker.id } });
  expect(assigned.status(), await assigned.text()).toBe(200);
  return { siteId: site.id, tripId: trip.id, lines: trip.lines, stops: trip.stops, waveName: opts.waveName, waveId: wave.id };
}
