/**
 * Issue 16, shorts: beyond "Mark handled" a supervisor re-picks a short in a later wave (a new open
 * order for the quantity not found, which the wave planner takes like any open order) or sends it to
 * the replenishment list (listed, exported as xlsx and CSV with formulas made inert, marked restocked).
 * Each is audited, and the short leaves the attention list with the follow-up shown on the board.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as XLSX from 'xlsx';
import { OrderDetail } from '../../../shared/orders';
import { Board, ReplenishmentItem, ShortFollowUpResult, type PickTrip } from '../../../shared/picking';
import { csrf } from '../../helpers/app';
import { awaitPreview, releaseTripFor } from '../../helpers/waves';
import { makeDemoPickingApp, post, readTrip, freePickers } from './setup';

let t: Awaited<ReturnType<typeof makeDemoPickingApp>>;
beforeAll(async () => {
  t = await makeDemoPickingApp();
});
afterAll(() => t.close());

const boardNow = async () => Board.parse((await t.as.supervisor.get(`/api/sites/${t.siteId}/board`)).body);
const followUp = (shortId: number, what: 'repick' | 'replenish' | 'handled') =>
  t.as.supervisor.post(`/api/sites/${t.siteId}/board/shorts/${shortId}/${what}`).set(csrf).send({});
const orderDetail = async (id: number) => OrderDetail.parse((await t.as.supervisor.get(`/api/sites/${t.siteId}/orders/${id}`)).body);

/** A started trip for the demo picker; its first line is reported short with `found` of its quantity found. */
async function shortOnNewTrip(
  found: (qty: number) => number,
): Promise<{ trip: PickTrip; line: PickTrip['stopList'][number]['lines'][number]; shortId: number }> {
  await freePickers(t);
  const tripId = await releaseTripFor(t, t.ids.picker, { orders: 4 });
  expect((await t.as.picker.post(`/api/picking/trips/${tripId}/start`).set(csrf).send({})).status).toBe(200);
  const trip = await readTrip(t.as.picker, tripId);
  const line = trip.stopList.flatMap((s) => s.lines).sort((a, b) => b.qty - a.qty)[0]!;
  const res = await post(t.as.picker, `/api/picking/trips/${trip.id}/lines/${line.id}/short`, { qtyFound: found(line.qty), reason: 'empty_bin' });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  const short = (await boardNow()).shorts.find((s) => s.tripId === trip.id)!;
  expect(short).toBeDefined();
  return { trip, line, shortId: short.id };
}

describe('re-pick in a later wave', () => {
  it('makes a new open order <original>-R1 for the quantity not found, with the due time and priority of the original', async () => {
    const { line, shortId } = await shortOnNewTrip((q) => q - 1);
    const original = await t.deps.db('orders').where({ site_id: t.siteId, ref: line.orderRef }).first();
    const res = await followUp(shortId, 'repick');
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const out = ShortFollowUpResult.parse(res.body);
    expect(out).toMatchObject({ shortId, followUp: 'repick', repickOrder: { ref: `${line.orderRef}-R1` } });

    const order = await orderDetail(out.repickOrder!.id);
    expect(order).toMatchObject({
      status: 'open',
      due: original.due,
      priority: original.priority,
      units: 1,
      repickOf: { id: original.id, ref: line.orderRef },
    });
    expect(order.lineItems).toEqual([expect.objectContaining({ lineNo: 1, sku: line.sku, qty: 1, bin: line.bin })]);
    // The original order names its re-pick order.
    expect((await orderDetail(original.id)).repicks).toEqual([{ id: out.repickOrder!.id, ref: `${line.orderRef}-R1`, sku: line.sku, qty: 1 }]);

    // The short leaves the attention list and is shown with its follow-up.
    const b = await boardNow();
    expect(b.shorts.map((s) => s.id)).not.toContain(shortId);
    expect(b.handledShorts.find((s) => s.id === shortId)).toMatchObject({ followUp: 'repick', handledBy: 'Sam Supervisor', repickOrder: out.repickOrder });
    expect(await t.deps.db('audit_log').where({ action: 'short.repick', subject: `line:${line.id}` })).toHaveLength(1);
  });

  it('answers a second click with the same order and refuses another follow-up (409 short_already_handled)', async () => {
    const { line, shortId } = await shortOnNewTrip(() => 0);
    const first = ShortFollowUpResult.parse((await followUp(shortId, 'repick')).body);
    const again = await followUp(shortId, 'repick');
    expect(again.status).toBe(200);
    expect(ShortFollowUpResult.parse(again.body).repickOrder).toEqual(first.repickOrder);
    expect(await t.deps.db('orders').where({ site_id: t.siteId }).andWhere('ref', 'like', `${line.orderRef}-R%`)).toHaveLength(1);
    // Nothing found at all: the whole line quantity is re-picked.
    expect((await orderDetail(first.repickOrder!.id)).lineItems[0]!.qty).toBe(line.qty);
    const other = await followUp(shortId, 'replenish');
    expect(other.status).toBe(409);
    expect(other.body.error).toMatchObject({ code: 'short_already_handled', details: { followUp: 'repick' } });
    expect(await t.deps.db('audit_log').where({ action: 'short.repick', subject: `line:${line.id}` })).toHaveLength(1);
  });

  it('numbers a second re-pick of the same order -R2', async () => {
    const { line, shortId } = await shortOnNewTrip(() => 0);
    // A re-pick order of this reference already exists (made by hand here, as a host system might).
    await t.deps.db('orders').insert({
      site_id: t.siteId,
      ref: `${line.orderRef}-R1`,
      status: 'cancelled',
      source: 'api',
      lines: 0,
      units: 0,
      weight_kg: 0,
      volume_l: 0,
      created_at: new Date().toISOString(),
    });
    expect(ShortFollowUpResult.parse((await followUp(shortId, 'repick')).body).repickOrder!.ref).toBe(`${line.orderRef}-R2`);
  });

  it('the wave planner takes the re-pick order like any open order', async () => {
    const { line, shortId } = await shortOnNewTrip((q) => q - 1);
    const { repickOrder } = ShortFollowUpResult.parse((await followUp(shortId, 'repick')).body);
    const cartProfileId = (await t.deps.db('cart_profiles').where({ site_id: t.siteId }).orderBy('id').first<{ id: number }>('id'))!.id;
    const res = await t.as.supervisor
      .post(`/api/sites/${t.siteId}/wave-previews`)
      .set(csrf)
      .send({ orderIds: [repickOrder!.id], cartProfileId, batching: 'single', method: 'best', improve: 'local' });
    expect(res.status, JSON.stringify(res.body)).toBe(202);
    const job = await awaitPreview(t, res.body.id);
    expect(job.state, JSON.stringify(job.error)).toBe('done');
    const trips = job.preview!.trips;
    expect(trips).toHaveLength(1);
    expect(trips[0]!.orders.map((o) => o.ref)).toEqual([repickOrder!.ref]);
    expect(trips[0]!.stops.flatMap((s) => s.bins)).toEqual([line.bin]);
  });

  it('keeps a re-picked short as recorded: the line can no longer be reopened (409 short_followed_up)', async () => {
    const { line, shortId } = await shortOnNewTrip(() => 0);
    await followUp(shortId, 'repick');
    const res = await t.as.supervisor.post(`/api/sites/${t.siteId}/board/lines/${line.id}/reopen`).set(csrf).send({ reason: 'wrong short' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('short_followed_up');
    expect((await t.deps.db('pick_lines').where({ id: line.id }).first()).status).toBe('short');
  });

  it('answers 404 for a short of another site or none at all', async () => {
    expect((await followUp(999_999, 'repick')).status).toBe(404);
    expect((await t.as.supervisor.post(`/api/sites/${t.siteId}/board/shorts/abc/replenish`).set(csrf).send({})).status).toBe(404);
  });
});

describe('the replenishment list', () => {
  it('lists a short sent to it with SKU, bin, quantity short, when, who and the order; audited; off the attention list', async () => {
    const { line, shortId, trip } = await shortOnNewTrip((q) => q - 1);
    const res = await followUp(shortId, 'replenish');
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(ShortFollowUpResult.parse(res.body)).toEqual({ shortId, followUp: 'replenish', repickOrder: null });
    const list = ReplenishmentItem.array().parse((await t.as.supervisor.get(`/api/sites/${t.siteId}/replenishment`)).body);
    expect(list[0]).toMatchObject({
      shortId,
      sku: line.sku,
      bin: line.bin,
      qtyShort: 1,
      reason: 'empty_bin',
      orderRef: line.orderRef,
      tripN: trip.n,
      reportedBy: 'Pat Picker',
      sentBy: 'Sam Supervisor',
      restockedAt: null,
    });
    const b = await boardNow();
    expect(b.shorts.map((s) => s.id)).not.toContain(shortId);
    expect(b.handledShorts.find((s) => s.id === shortId)).toMatchObject({ followUp: 'replenish', repickOrder: null });
    expect(await t.deps.db('audit_log').where({ action: 'short.replenish', subject: `line:${line.id}` })).toHaveLength(1);
    // No order is made for a replenishment.
    expect(await t.deps.db('orders').where({ site_id: t.siteId }).andWhere('ref', 'like', `${line.orderRef}-R%`)).toHaveLength(0);
  });

  it('exports the list as CSV and xlsx with formula-like text made inert (OWASP, "CSV Injection")', async () => {
    const { line, shortId } = await shortOnNewTrip(() => 0);
    await followUp(shortId, 'replenish');
    // A description as a hostile host system could have sent it before the input rules existed.
    await t.deps.db('pick_lines').where({ id: line.id }).update({ description: '=HYPERLINK("http://x.invalid","y")' });

    const csv = await t.as.supervisor.get(`/api/sites/${t.siteId}/replenishment/export?format=csv`);
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/^text\/csv/);
    expect(csv.headers['content-disposition']).toMatch(/replenishment-.*\.csv/);
    const rows = csv.text
      .replace(/^\ufeff/, '')
      .trim()
      .split('\r\n');
    expect(rows[0]).toBe('sku,description,bin,qty_short,reason,reported_at,reported_by,order,wave,trip,sent_at,sent_by,restocked_at,restocked_by');
    const row = rows.find((r) => r.startsWith(`${line.sku},`) && r.includes(line.orderRef))!;
    expect(row).toContain(`"'=HYPERLINK(""http://x.invalid"",""y"")"`);
    expect(row).toContain(`,${line.bin},${line.qty},empty_bin,`);

    const xlsx = await t.as.supervisor
      .get(`/api/sites/${t.siteId}/replenishment/export?format=xlsx`)
      .buffer(true)
      .parse((res, cb) => {
        const chunks: Buffer[] = [];
        res.on('data', (c: Buffer) => chunks.push(c));
        res.on('end', () => cb(null, Buffer.concat(chunks)));
      });
    expect(xlsx.status).toBe(200);
    const wb = XLSX.read(xlsx.body as Buffer, { type: 'buffer' });
    const sheet = XLSX.utils.sheet_to_json<(string | number)[]>(wb.Sheets[wb.SheetNames[0]!]!, { header: 1 });
    const cells = sheet.find((r) => r[0] === line.sku && r[7] === line.orderRef)!;
    expect(cells[1]).toBe(`'=HYPERLINK("http://x.invalid","y")`);
    expect(cells[3]).toBe(line.qty);
    expect(await t.deps.db('audit_log').where({ action: 'export.downloaded', subject: 'replenishment' })).toHaveLength(2);
  });

  it('marks an entry restocked: it leaves the open list, stays in the full one, audited once', async () => {
    const { shortId } = await shortOnNewTrip(() => 0);
    await followUp(shortId, 'replenish');
    for (let i = 0; i < 2; i++)
      expect((await t.as.supervisor.post(`/api/sites/${t.siteId}/replenishment/${shortId}/restocked`).set(csrf).send({})).status).toBe(200);
    const open = ReplenishmentItem.array().parse((await t.as.supervisor.get(`/api/sites/${t.siteId}/replenishment`)).body);
    expect(open.map((i) => i.shortId)).not.toContain(shortId);
    const all = ReplenishmentItem.array().parse((await t.as.supervisor.get(`/api/sites/${t.siteId}/replenishment?show=all`)).body);
    expect(all.find((i) => i.shortId === shortId)).toMatchObject({ restockedBy: 'Sam Supervisor' });
    expect(await t.deps.db('audit_log').where({ action: 'short.restocked' })).toHaveLength(1);
  });

  it('refuses "restocked" for a short that is not on the list (404)', async () => {
    const { shortId } = await shortOnNewTrip(() => 0);
    expect((await t.as.supervisor.post(`/api/sites/${t.siteId}/replenishment/${shortId}/restocked`).set(csrf).send({})).status).toBe(404);
  });

  it('keeps "Mark handled" as before, shown as handled on the board', async () => {
    const { shortId } = await shortOnNewTrip(() => 0);
    expect((await followUp(shortId, 'handled')).status).toBe(200);
    expect((await boardNow()).handledShorts.find((s) => s.id === shortId)).toMatchObject({ followUp: 'handled', repickOrder: null });
  });
});
