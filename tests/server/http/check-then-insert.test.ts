import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { csrf, makeTestApp, type TestApp } from '../../helpers/app';

// Two requests that check a name and then insert it must not both pass the check: the second is
// told the name is taken (409), never a crash from the UNIQUE index (500). Before the check and the
// insert shared a transaction, both requests read "free" between each other's awaits; on PostgreSQL (several
// pooled connections) the losers then hit the UNIQUE index and answered 500.
let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());

const statuses = (rs: { status: number }[]) => rs.map((r) => r.status).sort();

describe('check-then-insert under parallel requests', () => {
  it('creates a site code once when two admins send it at the same moment', async () => {
    const send = () => t.as.admin.post('/api/sites').set(csrf).send({ code: 'RACE1', name: 'Race site' });
    const rs = await Promise.all(Array.from({ length: 8 }, send));
    expect(statuses(rs)).toEqual([201, ...Array<number>(7).fill(409)]);
    for (const r of rs.filter((x) => x.status === 409)) expect(r.body.error.code).toBe('site_code_taken');
    const list = await t.as.admin.get('/api/sites');
    expect(list.body.filter((s: { code: string }) => s.code === 'RACE1')).toHaveLength(1);
  });

  it('adds a cart profile name once when sent twice at the same moment', async () => {
    const send = () => t.as.admin.post(`/api/sites/${t.siteId}/cart-profiles`).set(csrf).send({ name: 'Race cart', totes: 6, maxKg: 90, maxLitres: 300 });
    const rs = await Promise.all(Array.from({ length: 8 }, send));
    expect(statuses(rs)).toEqual([201, ...Array<number>(7).fill(409)]);
    for (const r of rs.filter((x) => x.status === 409)) expect(r.body.error.code).toBe('name_taken');
    const site = await t.as.admin.get(`/api/sites/${t.siteId}`);
    expect(site.body.cartProfiles.filter((c: { name: string }) => c.name === 'Race cart')).toHaveLength(1);
  });

  it('creates a picker badge once when two admins send it at the same moment', async () => {
    const send = (i: number) =>
      t.as.admin
        .post('/api/users/pickers')
        .set(csrf)
        .send({ name: `Race picker ${i}`, badge: 'RACE-7', pin: '482916', siteIds: [t.siteId] });
    const rs = await Promise.all(Array.from({ length: 8 }, (_, i) => send(i)));
    expect(statuses(rs)).toEqual([201, ...Array<number>(7).fill(409)]);
    for (const r of rs.filter((x) => x.status === 409)) expect(r.body.error.code).toBe('badge_taken');
    const users = await t.as.admin.get('/api/users');
    expect(users.body.filter((u: { badge: string | null }) => u.badge === 'RACE-7')).toHaveLength(1);
  });
});
