import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as XLSX from 'xlsx';
import { FloorPlanDetail, FloorPlanJob, FloorPlanSummary } from '../../../shared/floor-plans';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import { buildFloorPlanTemplate, floorPlanToWorkbook } from '../../../server/floor-plans/import';
import { csrf, makeTestApp, type TestApp } from '../../helpers/app';
import { floorPlanRowCounts, waitForJob } from './helpers';
import { binaryBody } from '../../helpers/http';

const XLSX_TYPE = 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet';

/** A small plan whose workbook has two errors: a bin on an aisle that does not exist, and a duplicate bin code. */
function badWorkbook(): Buffer {
  const plan = generateRectangularPlan({ aisles: 2, aisleLengthM: 20, aisleSpacingM: 4, baysPerAisle: 2, levels: 1 });
  plan.bins[0] = { ...plan.bins[0]!, aisle: 'Q' };
  plan.bins[2] = { ...plan.bins[2]!, code: plan.bins[1]!.code };
  return floorPlanToWorkbook(plan);
}

describe('uploading a floor-plan workbook', () => {
  let t: TestApp;
  const base = () => `/api/sites/${t.siteId}/floor-plans`;
  const upload = (file: Buffer, filename: string, name?: string) => {
    const req = t.as.supervisor.post(`${base()}/uploads`).set(csrf).attach('file', file, filename);
    return name ? req.field('name', name) : req;
  };

  beforeAll(async () => {
    t = await makeTestApp();
  });
  afterAll(() => t.close());

  it('serves the template as a workbook', async () => {
    const res = await t.as.engineer.get('/api/floor-plans/template').buffer(true).parse(binaryBody);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe(XLSX_TYPE);
    const wb = XLSX.read(res.body as Buffer);
    expect(wb.SheetNames).toEqual(expect.arrayContaining(['aisles', 'cross_aisles', 'bins', 'depots']));
  });

  it('turns the template into draft v1, then a second upload activated retires the first', async () => {
    const res = await upload(buildFloorPlanTemplate(), 'aislewright-floor-plan-template.xlsx');
    expect(res.status, JSON.stringify(res.body)).toBe(202);
    const job = await waitForJob(t.as.supervisor, t.siteId, FloorPlanJob.parse(res.body).id);
    expect(job).toMatchObject({ status: 'done', phase: 'done', fraction: 1, errors: [] });
    expect(job.totalMs).toBeGreaterThan(0);
    const first = FloorPlanDetail.parse((await t.as.supervisor.get(`${base()}/${job.planId}`)).body);
    expect(first).toMatchObject({
      version: 1,
      state: 'draft',
      source: 'upload',
      sourceFilename: 'aislewright-floor-plan-template.xlsx',
      name: 'aislewright-floor-plan-template',
    });
    expect(first.uploadedBy?.name).toBe('Sam Supervisor');
    expect(first.stats.bins).toBeGreaterThan(0);
    expect(first.unreachableBins).toEqual([]);
    expect((await t.as.supervisor.post(`${base()}/${first.id}/activate`).set(csrf)).status).toBe(200);

    const again = await upload(buildFloorPlanTemplate(), 'template.xlsx', 'Hall B, spring layout');
    const job2 = await waitForJob(t.as.supervisor, t.siteId, (again.body as FloorPlanJob).id);
    expect(job2.status).toBe('done');
    expect((await t.as.supervisor.post(`${base()}/${job2.planId}/activate`).set(csrf)).status).toBe(200);
    const list = FloorPlanSummary.array().parse((await t.as.supervisor.get(base())).body);
    expect(list.map((p) => [p.version, p.name, p.state])).toEqual([
      [2, 'Hall B, spring layout', 'active'],
      [1, 'aislewright-floor-plan-template', 'retired'],
    ]);
  });

  it('saves nothing for a file with errors and returns the error table', async () => {
    const before = await floorPlanRowCounts(t.deps.db);
    const res = await upload(badWorkbook(), 'bad.xlsx');
    expect(res.status).toBe(202);
    const job = await waitForJob(t.as.supervisor, t.siteId, (res.body as FloorPlanJob).id);
    expect(job.status).toBe('invalid');
    expect(job.planId).toBeNull();
    expect(job.message).toMatch(/nothing was saved/);
    expect(job.errors.length).toBeGreaterThanOrEqual(2);
    for (const e of job.errors) expect(e).toEqual(expect.objectContaining({ sheet: expect.any(String), message: expect.any(String) }));
    expect(job.errors.some((e) => e.sheet === 'bins' && e.value === 'Q')).toBe(true);
    expect(await floorPlanRowCounts(t.deps.db)).toEqual(before);

    const csv = await t.as.supervisor.get(`${base()}/jobs/${job.id}/errors`).query({ format: 'csv' });
    expect(csv.status).toBe(200);
    expect(csv.headers['content-disposition']).toContain('floor-plan-errors.csv');
    expect(csv.text.replace(/^\ufeff/, '').split('\r\n')[0]).toBe('sheet,row,column,value,message');
    expect(csv.text.split('\r\n').filter(Boolean)).toHaveLength(job.errors.length + 1);
    const xlsx = await t.as.supervisor.get(`${base()}/jobs/${job.id}/errors`);
    expect(xlsx.status).toBe(200);
    expect(xlsx.headers['content-type']).toBe(XLSX_TYPE);
  });

  it('refuses a file that is not a workbook, saving nothing', async () => {
    const before = await floorPlanRowCounts(t.deps.db);
    const res = await upload(Buffer.from('this is not a spreadsheet'), 'plan.xlsx');
    const job = await waitForJob(t.as.supervisor, t.siteId, (res.body as FloorPlanJob).id);
    expect(job.status).toBe('invalid');
    expect(job.errors.length).toBeGreaterThan(0);
    expect(await floorPlanRowCounts(t.deps.db)).toEqual(before);
  });

  it('asks for the file field when none is sent', async () => {
    const res = await t.as.supervisor.post(`${base()}/uploads`).set(csrf).field('name', 'x');
    expect(res.status).toBe(400);
    expect(res.body.error.details).toEqual([{ field: 'file', message: 'required' }]);
  });

  it('has no error table for a job that succeeded', async () => {
    const res = await upload(buildFloorPlanTemplate(), 'ok.xlsx');
    const job = await waitForJob(t.as.supervisor, t.siteId, (res.body as FloorPlanJob).id);
    expect((await t.as.supervisor.get(`${base()}/jobs/${job.id}/errors`)).status).toBe(409);
  });

  it('streams progress as server-sent events until the job ends', async () => {
    const res = await upload(buildFloorPlanTemplate(), 'sse.xlsx');
    const id = (res.body as FloorPlanJob).id;
    const stream = await t.as.supervisor
      .get(`${base()}/jobs/${id}/events`)
      .buffer(true)
      .parse((r, cb) => {
        let text = '';
        r.setEncoding('utf8');
        r.on('data', (c: string) => (text += c));
        r.on('end', () => cb(null, text));
      });
    expect(stream.headers['content-type']).toContain('text/event-stream');
    const events = (stream.body as string)
      .split('\n\n')
      .filter(Boolean)
      .map((block) => {
        const [ev, data] = block.split('\n');
        return { event: ev!.replace('event: ', ''), job: FloorPlanJob.parse(JSON.parse(data!.replace('data: ', ''))) };
      });
    expect(events.at(-1)!.event).toBe('end');
    expect(events.at(-1)!.job.status).toBe('done');
    expect(events.length).toBeGreaterThanOrEqual(2);
  });

  it('is refused to pickers and engineers (403)', async () => {
    for (const who of ['picker', 'engineer'] as const) {
      const res = await t.as[who].post(`${base()}/uploads`).set(csrf).attach('file', buildFloorPlanTemplate(), 'template.xlsx');
      expect(res.status).toBe(403);
    }
  });
});
