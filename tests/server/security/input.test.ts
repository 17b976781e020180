/**
 * Security spec for input and output (issue 11, items 5, 6, 7 and 9): live-board streams share one
 * snapshot per change and are capped per person; one rule set for text and numbers on every import
 * path and formulas neutralised in every export (OWASP, "CSV Injection"); push API answers that name
 * the order and field; site time zones checked as IANA names and used in exports.
 */
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as XLSX from 'xlsx';
import { csvDocument, MAX_LINE_QTY } from '../../../shared/input-rules';
import { readCode } from '../../../server/imports/cells';
import { importSkus } from '../../../server/orders/orders.service';
import { DEMO_PASSWORD } from '../../../server/seed/demo';
import { csrf } from '../../helpers/app';
import { confirm, makePickingApp, readTrip, type PickingFixture } from '../picking/setup';
import { binaryBody, sessionCookie } from '../../helpers/http';

let t: PickingFixture;
let token: string;
let server: http.Server;
let port: number;

beforeAll(async () => {
  t = await makePickingApp();
  const skuRows = ['SKU-RED', 'SKU-BLUE'].map((sku, i) => ({
    row: i + 2,
    values: { sku, description: `${sku} widget`, bin: `A-01-0${i + 1}-1`, unit_weight_kg: 0.5, unit_volume_l: 1 },
  }));
  expect((await importSkus(t.deps.db, t.siteId, null, 'skus', skuRows, async () => new Set())).ok).toBe(true);
  token = (await t.as.admin.post(`/api/sites/${t.siteId}/integration-tokens`).set(csrf).send({ name: 'Host' })).body.token;
  server = t.app.listen(0, '127.0.0.1');
  await new Promise((r) => server.once('listening', r));
  port = (server.address() as AddressInfo).port;
});
afterAll(async () => {
  server.close();
  await t.close();
});

async function supervisorCookie(): Promise<string> {
  return sessionCookie(await t.anon.post('/api/auth/sign-in').set(csrf).send({ email: 'supervisor@demo.aislewright.test', password: DEMO_PASSWORD }));
}

interface OpenStream {
  status: number;
  body: string;
  events: number;
  waitFor(n: number): Promise<void>;
  close(): void;
}

/** Opens `board/events` and counts `board` events; resolves once the status is known. */
function openStream(cookie: string): Promise<OpenStream> {
  return new Promise((resolve, reject) => {
    const waiters: { n: number; done: () => void }[] = [];
    const req = http.get({ host: '127.0.0.1', port, path: `/api/sites/${t.siteId}/board/events`, headers: { cookie, accept: 'text/event-stream' } });
    const s: OpenStream = {
      status: 0,
      body: '',
      events: 0,
      waitFor: (n) => (s.events >= n ? Promise.resolve() : new Promise<void>((done) => waiters.push({ n, done }))),
      close: () => req.destroy(),
    };
    req.on('response', (res) => {
      s.status = res.statusCode ?? 0;
      res.on('data', (chunk: Buffer) => {
        s.body += chunk.toString('utf8');
        s.events = s.body.split('event: board\n').length - 1;
        for (const w of waiters.filter((x) => s.events >= x.n)) {
          waiters.splice(waiters.indexOf(w), 1);
          w.done();
        }
      });
      resolve(s);
    });
    req.on('error', reject);
  });
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe('item 5: live-board streams', () => {
  it('builds one board snapshot per change for all open streams of a site, and every stream gets it', async () => {
    const w = await t.wave([{ stops: 3, pickerId: t.ids.picker }], 'Streams wave');
    const trip = await readTrip(t.as.picker, w.tripIds[0]!);
    const cookie = await supervisorCookie();
    // Four streams of one person (under the cap of five) and one of the admin.
    const adminCookie = sessionCookie(await t.anon.post('/api/auth/sign-in').set(csrf).send({ email: 'admin@demo.aislewright.test', password: DEMO_PASSWORD }));
    const streams = [...(await Promise.all([1, 2, 3, 4].map(() => openStream(cookie)))), await openStream(adminCookie)];
    try {
      await Promise.all(streams.map((s) => s.waitFor(1)));
      const before = t.deps.boardStreams.builds;
      // A burst of two confirmations inside the debounce: one build, one event on each stream.
      await confirm(t.as.picker, trip.id, trip.stopList[0]!.lines[0]!.id);
      await confirm(t.as.picker, trip.id, trip.stopList[1]!.lines[0]!.id);
      await Promise.all(streams.map((s) => s.waitFor(2)));
      await sleep(400);
      expect(t.deps.boardStreams.builds - before).toBe(1);
      expect(streams.map((s) => s.events)).toEqual([2, 2, 2, 2, 2]);
      // The shared frame carries the burst's result.
      const last = streams[0]!.body.split('event: board\ndata: ').at(-1)!.split('\n')[0]!;
      const board = JSON.parse(last) as { waves: { id: number; trips: { linesDone: number }[] }[] };
      expect(board.waves.find((x) => x.id === w.waveId)!.trips[0]!.linesDone).toBe(2);
    } finally {
      for (const s of streams) s.close();
    }
  });

  it('refuses a sixth open stream of one person with 429 and a clear message; closing one frees a place', async () => {
    const cookie = await supervisorCookie();
    await sleep(200); // streams of the previous test are closed by now
    const five = await Promise.all([1, 2, 3, 4, 5].map(() => openStream(cookie)));
    try {
      expect(five.map((s) => s.status)).toEqual([200, 200, 200, 200, 200]);
      const sixth = await openStream(cookie);
      await sleep(50);
      expect(sixth.status).toBe(429);
      const body = JSON.parse(sixth.body) as { error: { code: string; message: string } };
      expect(body.error.code).toBe('too_many_board_streams');
      expect(body.error.message).toMatch(/5 live boards open/);
      five[0]!.close();
      await sleep(100);
      const again = await openStream(cookie);
      expect(again.status).toBe(200);
      again.close();
    } finally {
      for (const s of five) s.close();
    }
  });
});

const push = (body: object) => request(t.app).post(`/api/sites/${t.siteId}/orders/push`).set('Authorization', `Bearer ${token}`).send(body);
const uploadCsv = (path: 'orders' | 'skus', csv: string) =>
  t.as.supervisor.post(`/api/sites/${t.siteId}/${path}/import`).set(csrf).attach('file', Buffer.from(csv, 'utf8'), `${path}.csv`);

describe('item 6: one rule set for imported text and numbers', () => {
  const hostile = [
    ['=HYPERLINK("http://example.invalid")', /starts with "="/],
    ['+SUM(A1)', /starts with "\+"/],
    ['-2+3', /starts with "-"/],
    ['@SUM(A1)', /starts with "@"/],
    ['\tREF-1', /control character \(tab\)/],
    ['REF\u202Eevil', /text-direction character \(U\+202E\)/],
    ['REF\u0007', /control character \(U\+0007\)/],
    ['R'.repeat(65), /longer than 64 characters/],
  ] as const;

  // The file reader trims spaces, tabs and line ends around every cell (a leading tab never reaches
  // the store); a tab inside a reference is refused.
  const inFiles = hostile.map(([ref, m]) => (ref.startsWith('\t') ? (['REF\t1', m] as const) : ([ref, m] as const)));

  it.each(inFiles)('refuses the order reference %j in an order file, in the error table', async (ref, message) => {
    const res = await uploadCsv('orders', `order,sku,qty\r\n"${ref}",SKU-RED,1\r\n`);
    expect(res.body.ok).toBe(false);
    expect(res.body.errors).toContainEqual(expect.objectContaining({ sheet: 'orders', row: 2, column: 'order', message: expect.stringMatching(message) }));
    expect(await t.deps.db('orders').where({ ref }).first()).toBeUndefined();
  });

  it('stores a file reference with a leading tab trimmed, never starting with the tab', async () => {
    const res = await uploadCsv('orders', 'order,sku,qty\r\n"\tTAB-1",SKU-RED,1\r\n');
    expect(res.body).toMatchObject({ ok: true, created: 1 });
    expect(await t.deps.db('orders').where('ref', 'like', '%TAB-1').pluck('ref')).toEqual(['TAB-1']);
  });

  it.each(hostile)('refuses the order reference %j from the push API with 400 naming the field', async (ref, message) => {
    const res = await push({ orders: [{ order: ref, lines: [{ sku: 'SKU-RED', qty: 1 }] }] });
    expect(res.status).toBe(400);
    expect(res.body.error.details).toContainEqual({ field: 'orders.0.order', message: expect.stringMatching(message) });
  });

  it('refuses hostile SKU codes, bins and descriptions in a SKU file', async () => {
    const res = await uploadCsv('skus', 'sku,description,bin,unit_weight_kg,unit_volume_l\r\n@SKU,fine,A-01-01-1,1,1\r\nSKU-OK,"\u202Ehidden",=B1,1,1\r\n');
    expect(res.body.ok).toBe(false);
    const at = (row: number, column: string) => res.body.errors.find((e: { row: number; column: string }) => e.row === row && e.column === column);
    expect(at(2, 'sku').message).toMatch(/^SKU starts with "@"/);
    expect(at(3, 'description').message).toMatch(/text-direction character/);
    // The refused value is shown with the invisible character written out, so it cannot reorder the table.
    expect(at(3, 'description').value).toBe('⟨U+202E⟩hidden');
    expect(at(3, 'bin').message).toMatch(/^bin starts with "="/);
  });

  it('refuses file quantities of 1e308, 2^53+1 and above the push cap; accepts the cap itself', async () => {
    const res = await uploadCsv('orders', `order,sku,qty\r\nQ-1,SKU-RED,1e308\r\nQ-2,SKU-RED,9007199254740993\r\nQ-3,SKU-RED,${MAX_LINE_QTY + 1}\r\n`);
    expect(res.body.ok).toBe(false);
    expect(res.body.errors.map((e: { row: number; column: string }) => [e.row, e.column])).toEqual([
      [2, 'qty'],
      [3, 'qty'],
      [4, 'qty'],
    ]);
    expect(res.body.errors[0].message).toBe('quantity must be a whole number from 1 to 100,000');
    const ok = await uploadCsv('orders', `order,sku,qty\r\nQ-4,SKU-RED,${MAX_LINE_QTY}\r\n`);
    expect(ok.body).toMatchObject({ ok: true, created: 1 });
  });

  it('refuses SKU weights and volumes of 1e308, Infinity, hex and above the caps', async () => {
    const res = await uploadCsv(
      'skus',
      'sku,description,bin,unit_weight_kg,unit_volume_l\r\nW-1,,A-01-01-1,1e308,1\r\nW-2,,A-01-01-1,1,Infinity\r\nW-3,,A-01-01-1,0x10,1\r\nW-4,,A-01-01-1,1001,10001\r\n',
    );
    expect(res.body.ok).toBe(false);
    expect(res.body.errors.map((e: { row: number; column: string }) => `${e.row}:${e.column}`)).toEqual([
      '2:unit_weight_kg',
      '3:unit_volume_l',
      '4:unit_weight_kg',
      '5:unit_weight_kg',
      '5:unit_volume_l',
    ]);
    expect(res.body.errors.find((e: { row: number }) => e.row === 5).message).toBe('unit weight must be at most 1,000 kg');
  });

  it('refuses a floor-plan code with a text-direction override (the floor-plan rules, extended)', () => {
    expect(readCode('A-01\u202E10', 'bin')).toEqual({ ok: false, message: expect.stringMatching(/^bin holds an invisible text-direction character/) });
    expect(readCode('A-01-01-1', 'bin')).toEqual({ ok: true, value: 'A-01-01-1' });
  });

  it('quotes formula starts in the wave report workbook (a name typed by an admin)', async () => {
    await t.deps.db('users').where({ id: t.ids.picker2 }).update({ name: '=HYPERLINK("http://example.invalid","x")' });
    try {
      const w = await t.wave([{ stops: 2, pickerId: t.ids.picker2 }], 'Formula wave');
      const res = await t.as.supervisor.get(`/api/sites/${t.siteId}/board/waves/${w.waveId}/report.xlsx`).buffer(true).parse(binaryBody);
      const wb = XLSX.read(res.body as Buffer, { type: 'buffer', cellFormula: true });
      const cell = wb.Sheets.trips!.B2!;
      expect(cell).toMatchObject({ t: 's', v: `'=HYPERLINK("http://example.invalid","x")` });
      expect(cell.f).toBeUndefined();
    } finally {
      await t.deps.db('users').where({ id: t.ids.picker2 }).update({ name: 'Sam Second' });
    }
  });

  it('writes CSV (server error tables and the browser download) with formula starts quoted', () => {
    const csv = csvDocument([['value'], ['=1+1'], ['+1'], ['-1'], ['@A1'], ['\tx'], ['\rx'], ['plain, "quoted"'], [-5]]);
    expect(csv.split('\r\n')).toEqual(['\ufeffvalue', "'=1+1", "'+1", "'-1", "'@A1", "'\tx", `"'\rx"`, '"plain, ""quoted"""', '-5', '']);
  });
});

describe('item 7: push API answers', () => {
  it('answers an unknown SKU with 422 naming the order and field, saving nothing', async () => {
    const res = await push({
      orders: [
        { order: 'P-1', lines: [{ sku: 'SKU-RED', qty: 1 }] },
        {
          order: 'P-2',
          lines: [
            { sku: 'SKU-RED', qty: 1 },
            { sku: 'NOPE', qty: 2 },
          ],
        },
      ],
    });
    expect(res.status).toBe(422);
    expect(res.body.error).toMatchObject({ code: 'unknown_sku', details: [{ order: 'P-2', field: 'orders.1.lines.1.sku', value: 'NOPE' }] });
    expect(res.body.error.message).toMatch(/order P-2, orders\.1\.lines\.1\.sku: SKU NOPE is not in the SKU master/);
    expect(await t.deps.db('orders').whereIn('ref', ['P-1', 'P-2']).first()).toBeUndefined();
  });

  it('refuses the same order reference twice in one batch, naming it', async () => {
    const res = await push({
      orders: [
        { order: 'P-3', lines: [{ sku: 'SKU-RED', qty: 1 }] },
        { order: 'P-4', lines: [{ sku: 'SKU-RED', qty: 1 }] },
        { order: 'P-3', lines: [{ sku: 'SKU-BLUE', qty: 1 }] },
      ],
    });
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({ code: 'duplicate_order', details: [{ field: 'orders.2.order', order: 'P-3' }] });
    expect(res.body.error.message).toMatch(/order P-3 appears more than once in this request \(orders\.0 and orders\.2\)/);
    expect(await t.deps.db('orders').whereIn('ref', ['P-3', 'P-4']).first()).toBeUndefined();
  });

  it('refuses a change to an order in a released wave with 409 order_released naming the order and wave', async () => {
    expect((await push({ orders: [{ order: 'P-5', lines: [{ sku: 'SKU-RED', qty: 1 }] }] })).status).toBe(200);
    const w = await t.wave([{ stops: 1 }], 'Released for push');
    await t.deps.db('orders').where({ ref: 'P-5' }).update({ status: 'planned', wave_id: w.waveId });
    const same = await push({ orders: [{ order: 'P-5', lines: [{ sku: 'SKU-RED', qty: 1 }] }] });
    expect(same.body).toMatchObject({ ok: true, unchanged: 1 });
    const changed = await push({
      orders: [
        { order: 'P-6', lines: [{ sku: 'SKU-RED', qty: 1 }] },
        { order: 'P-5', lines: [{ sku: 'SKU-RED', qty: 3 }] },
      ],
    });
    expect(changed.status).toBe(409);
    expect(changed.body.error).toMatchObject({
      code: 'order_released',
      details: [{ order: 'P-5', field: 'orders.1', status: 'planned', waveId: w.waveId, wave: 'Released for push' }],
    });
    expect(changed.body.error.message).toMatch(/order P-5 is in a released wave \(wave "Released for push"/);
    // All or nothing: P-6 was not saved, P-5 kept its quantity.
    expect(await t.deps.db('orders').where({ ref: 'P-6' }).first()).toBeUndefined();
    expect(await t.deps.db('order_lines').join('orders', 'orders.id', 'order_lines.order_id').where('orders.ref', 'P-5').pluck('qty')).toEqual([1]);
  });
});

describe('item 9: site time zone', () => {
  it('refuses a time zone that is not an IANA zone with 400 naming the field', async () => {
    const bad = await t.as.admin.patch(`/api/sites/${t.siteId}`).set(csrf).send({ timezone: 'Mars/Olympus_Mons' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details).toEqual([{ field: 'timezone', message: expect.stringMatching(/IANA/) }]);
    for (const zone of ['+01:00', 'Europe/Berlin; DROP', '']) {
      expect((await t.as.admin.patch(`/api/sites/${t.siteId}`).set(csrf).send({ timezone: zone })).status).toBe(400);
    }
    const created = await t.as.admin.post('/api/sites').set(csrf).send({ code: 'MARS-1', name: 'Olympus hall', timezone: 'Mars/Olympus_Mons' });
    expect(created.status).toBe(400);
    expect(created.body.error.details[0].field).toBe('timezone');
    const good = await t.as.admin.patch(`/api/sites/${t.siteId}`).set(csrf).send({ timezone: 'America/Argentina/Buenos_Aires' });
    expect(good.status).toBe(200);
    expect(good.body.timezone).toBe('America/Argentina/Buenos_Aires');
  });

  it("writes the wave report's times in the site's zone and names the zone", async () => {
    // Asia/Kolkata is UTC+05:30 all year (no daylight saving; IANA tz database).
    expect((await t.as.admin.patch(`/api/sites/${t.siteId}`).set(csrf).send({ timezone: 'Asia/Kolkata' })).status).toBe(200);
    const w = await t.wave([{ stops: 1 }], 'Zone wave');
    await t.deps
      .db('trips')
      .where({ id: w.tripIds[0] })
      .update({ status: 'done', started_at: '2026-12-05T08:00:00.000Z', finished_at: '2026-12-05T20:45:00.000Z' });
    const res = await t.as.supervisor.get(`/api/sites/${t.siteId}/board/waves/${w.waveId}/report.xlsx`).buffer(true).parse(binaryBody);
    const rows = XLSX.utils.sheet_to_json<string[]>(XLSX.read(res.body as Buffer, { type: 'buffer' }).Sheets.trips!, { header: 1 });
    expect(rows[0]!.slice(-2)).toEqual(['started (Asia/Kolkata)', 'finished (Asia/Kolkata)']);
    // 08:00 UTC is 13:30 in Kolkata; 20:45 UTC is 02:15 the next day.
    expect(rows[1]!.slice(-2)).toEqual(['2026-12-05 13:30', '2026-12-06 02:15']);
    // The signed-in user's site list carries the zone the client formats with.
    const me = await t.as.supervisor.get('/api/auth/me');
    expect(me.body.sites.find((s: { id: number }) => s.id === t.siteId).timezone).toBe('Asia/Kolkata');
    await t.as.admin.patch(`/api/sites/${t.siteId}`).set(csrf).send({ timezone: 'UTC' });
  });
});
