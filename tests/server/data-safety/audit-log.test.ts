/** The audit log API: filters, paging, access by site, exports (xlsx/CSV with formulas made inert). */
import * as XLSX from 'xlsx';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditPage } from '../../../shared/data-safety';
import { audit } from '../../../server/audit/audit';
import { csrf, makeTestApp, type TestApp } from '../../helpers/app';
import { binaryBody } from '../../helpers/http';

let t: TestApp;
let otherSite: number;
let ids: Record<'admin' | 'supervisor' | 'engineer', number>;

beforeAll(async () => {
  t = await makeTestApp();
  const user = async (role: string) => (await t.deps.db('users').where({ role }).first<{ id: number }>('id'))!.id;
  ids = { admin: await user('admin'), supervisor: await user('supervisor'), engineer: await user('engineer') };
  const res = await t.as.admin.post('/api/sites').set(csrf).send({ code: 'OTHER-1', name: 'Other hall' });
  otherSite = res.body.id as number;
  await t.deps.db('audit_log').delete();
  // 30 entries at our site over three days, two people, two actions; 5 at the other site.
  const rows = [];
  for (let i = 0; i < 30; i++) {
    rows.push({
      site_id: t.siteId,
      user_id: i % 3 === 0 ? ids.admin : ids.supervisor,
      action: i % 2 === 0 ? 'wave.released' : 'trip.assign',
      subject: i === 7 ? '=HYPERLINK("http://evil.invalid","x")' : `wave:${i}`,
      detail: null,
      device: i === 4 ? 'Tablet 4' : null,
      at: new Date(Date.UTC(2026, 11, 1 + Math.floor(i / 10), 8, i)).toISOString(),
    });
  }
  for (let i = 0; i < 5; i++)
    rows.push({
      site_id: otherSite,
      user_id: ids.admin,
      action: 'site.updated',
      subject: `other:${i}`,
      detail: null,
      device: null,
      at: '2026-12-02T09:00:00.000Z',
    });
  await t.deps.db('audit_log').insert(rows);
});
afterAll(() => t.close());

const page = async (query: string, agent = t.as.supervisor) => {
  const res = await agent.get(`/api/sites/${t.siteId}/audit-log${query}`);
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return AuditPage.parse(res.body);
};

describe('GET /api/sites/:siteId/audit-log', () => {
  it('pages newest first with the total, and names who did it', async () => {
    const p1 = await page('?pageSize=12');
    expect(p1.total).toBe(30);
    expect(p1.items).toHaveLength(12);
    const p3 = await page('?pageSize=12&page=3');
    expect(p3.items).toHaveLength(6);
    const all = [...p1.items, ...(await page('?pageSize=12&page=2')).items, ...p3.items];
    expect(new Set(all.map((i) => i.id)).size).toBe(30);
    const times = all.map((i) => i.at);
    expect([...times].sort().reverse()).toEqual(times);
    expect(p1.items[0]).toMatchObject({ userName: 'Sam Supervisor', userRole: 'supervisor', siteCode: expect.any(String) });
    expect(all.find((i) => i.subject === 'wave:4')?.device).toBe('Tablet 4');
    // Other sites' entries never show here.
    expect(all.some((i) => i.subject?.startsWith('other:'))).toBe(false);
  });

  it('filters by person, action and dates (a date alone means the whole day)', async () => {
    const byPerson = await page(`?userId=${ids.admin}&pageSize=200`);
    expect(byPerson.total).toBe(10);
    expect(byPerson.items.every((i) => i.userId === ids.admin)).toBe(true);
    const byAction = await page('?action=trip.assign&pageSize=200');
    expect(byAction.total).toBe(15);
    const day2 = await page('?from=2026-12-02&to=2026-12-02&pageSize=200');
    expect(day2.total).toBe(10);
    expect(day2.items.every((i) => i.at.startsWith('2026-12-02'))).toBe(true);
    const combined = await page(`?from=2026-12-02&userId=${ids.admin}&action=wave.released`);
    // i in 10..29, i % 3 === 0 and i even: 12, 18, 24.
    expect(combined.total).toBe(3);
    expect(byAction.actions).toEqual(['trip.assign', 'wave.released']);
    expect(byAction.people.map((p) => p.name).sort()).toEqual(['Avery Admin', 'Sam Supervisor']);
  });

  it('refuses a bad filter with a 400 naming it', async () => {
    const res = await t.as.supervisor.get(`/api/sites/${t.siteId}/audit-log?from=yesterday`);
    expect(res.status).toBe(400);
    expect(res.body.error.details[0].field).toBe('from');
  });

  it('refuses a supervisor of another site, engineers and pickers', async () => {
    const other = await t.as.supervisor.get(`/api/sites/${otherSite}/audit-log`);
    expect(other.status).toBe(403);
    expect(other.body.error.code).toBe('not_site_member');
    expect((await t.as.supervisor.get(`/api/sites/${otherSite}/audit-log/export`)).status).toBe(403);
    expect((await t.as.engineer.get(`/api/sites/${t.siteId}/audit-log`)).status).toBe(403);
    expect((await t.as.picker.get(`/api/sites/${t.siteId}/audit-log`)).status).toBe(403);
    expect((await t.as.supervisor.get('/api/audit-log')).status).toBe(403);
  });

  it('lets an admin read every site, and the log over all sites', async () => {
    expect((await page('', t.as.admin)).total).toBe(30);
    const res = await t.as.admin.get(`/api/sites/${otherSite}/audit-log`);
    expect(AuditPage.parse(res.body).total).toBe(5);
    await audit(t.deps.db, { userId: ids.admin, action: 'user.updated', subject: 'no site' });
    const all = AuditPage.parse((await t.as.admin.get('/api/audit-log?pageSize=200')).body);
    expect(all.total).toBe(36);
    expect(all.items.find((i) => i.subject === 'no site')?.siteId).toBeNull();
  });
});

describe('audit log export', () => {
  it('downloads CSV with the filters applied and formula-like cells made inert', async () => {
    const res = await t.as.supervisor.get(`/api/sites/${t.siteId}/audit-log/export?format=csv&action=trip.assign`).buffer(true);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toContain('text/csv');
    expect(res.headers['content-disposition']).toMatch(/attachment; filename="audit-log-.+\.csv"/);
    const text = res.text.replace(/^\ufeff/, '');
    const lines = text.trim().split('\r\n');
    expect(lines[0]).toBe('time (UTC),site,person,role,action,record,device,detail');
    expect(lines).toHaveLength(16);
    // Line 7 is a trip.assign entry whose subject starts with "=": it must start with a quote.
    expect(text).toContain(`"'=HYPERLINK(""http://evil.invalid"",""x"")"`);
  });

  it('downloads xlsx: one sheet, a row per entry, text cells stay text', async () => {
    const res = await t.as.supervisor.get(`/api/sites/${t.siteId}/audit-log/export?format=xlsx`).buffer(true).parse(binaryBody);
    expect(res.status).toBe(200);
    const wb = XLSX.read(res.body as Buffer, { type: 'buffer' });
    const rows = XLSX.utils.sheet_to_json<string[]>(wb.Sheets[wb.SheetNames[0]!]!, { header: 1 });
    expect(rows).toHaveLength(31);
    const cell = rows.flat().find((v) => typeof v === 'string' && v.includes('HYPERLINK'));
    expect(cell?.startsWith("'=")).toBe(true);
  });
});
