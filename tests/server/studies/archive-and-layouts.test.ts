import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import { engineParams } from '../../../server/floor-plans/floor-plans.service';
import { checkFloorPlanFile, floorPlanToWorkbook } from '../../../server/floor-plans/import';
import type { GeneratePlanParams } from '../../../shared/floor-plans';
import type { CandidateLayoutUpload, StudyDetail, StudyInputsBody, StudyResults, StudySummary } from '../../../shared/studies';
import { csrf, type TestApp } from '../../helpers/app';
import { makeDemoApp } from '../../helpers/waves';

const PLAN: GeneratePlanParams = {
  aisles: 6,
  aisleLengthM: 24,
  aisleSpacingM: 3.2,
  baysPerAisle: 12,
  levels: 2,
  bothSides: true,
  crossAisles: { front: true, back: true, middle: 0 },
  crossAisleWidthM: 3,
  depot: 'front_left',
};

const study = (name: string, extra: Partial<StudyInputsBody> = {}): StudyInputsBody => ({
  name,
  seed: 3,
  work: {
    kind: 'generated',
    plan: { source: 'generated', params: PLAN },
    orders: { waves: 1, ordersPerWave: 16, linesMin: 1, linesMax: 4, skus: 100, skewSkuPct: 20, skewLinesPct: 80 },
    batching: 'savings',
    wavesPerDay: 4,
  },
  routing: ['best+local', 's-shape'],
  batching: ['savings'],
  ...extra,
});

let t: TestApp;
const base = () => `/api/sites/${t.siteId}/studies`;

async function waitDone(id: number): Promise<StudyDetail & { results: StudyResults }> {
  for (let i = 0; i < 1200; i++) {
    const s = (await t.as.engineer.get(`${base()}/${id}`)).body as StudyDetail;
    if (s.status === 'done') return s as StudyDetail & { results: StudyResults };
    if (s.status === 'failed' || s.status === 'cancelled') throw new Error(`study ${id} ${s.status}: ${s.error}`);
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('study did not finish in 120 s');
}
const start = async (body: StudyInputsBody): Promise<StudySummary> => {
  const res = await t.as.engineer.post(base()).set(csrf).send(body);
  expect(res.status, JSON.stringify(res.body)).toBe(202);
  return res.body as StudySummary;
};
const uploadLayout = async (file: Buffer, filename: string): Promise<CandidateLayoutUpload> => {
  const res = await t.as.engineer.post(`${base()}/layouts`).set(csrf).attach('file', file, filename);
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.body as CandidateLayoutUpload;
};
const audits = (action: string) =>
  t.deps.db('audit_log').where({ action }).select<{ subject: string; detail: string; user_id: number }[]>('subject', 'detail', 'user_id');

beforeAll(async () => {
  t = await makeDemoApp();
}, 120_000);
afterAll(() => t.close());

describe('archiving and deleting studies', () => {
  it('hides an archived study from the default list, shows it on request, and brings it back; each step audited', async () => {
    const s = await waitDone((await start(study('To archive'))).id);
    const ids = async (q = '') => ((await t.as.engineer.get(`${base()}${q}`)).body as StudySummary[]).map((x) => x.id);
    expect(await ids()).toContain(s.id);
    const archived = await t.as.engineer.post(`${base()}/${s.id}/archive`).set(csrf).send({});
    expect(archived.status).toBe(200);
    expect(archived.body.archivedAt).toEqual(expect.any(String));
    expect(await ids()).not.toContain(s.id);
    expect(await ids('?archived=include')).toContain(s.id);
    // Still readable and exportable while archived.
    expect((await t.as.engineer.get(`${base()}/${s.id}`)).body.results).not.toBeNull();
    const back = await t.as.supervisor.post(`${base()}/${s.id}/unarchive`).set(csrf).send({});
    expect(back.status).toBe(200);
    expect(back.body.archivedAt).toBeNull();
    expect(await ids()).toContain(s.id);
    expect((await audits('study.archived')).map((a) => a.subject)).toContain('To archive');
    expect((await audits('study.unarchived')).map((a) => a.subject)).toContain('To archive');
    expect((await t.as.picker.post(`${base()}/${s.id}/archive`).set(csrf).send({})).status).toBe(403);
    expect((await t.as.engineer.post(`${base()}/999999/archive`).set(csrf).send({})).status).toBe(404);
  }, 120_000);

  it('refuses to delete or archive a running study (cancel first), and audits a deletion with who and what', async () => {
    const big = study('Running', {
      work: { ...(study('x').work as object), orders: { waves: 6, ordersPerWave: 200, linesMin: 2, linesMax: 8, skus: 200, skewSkuPct: 20, skewLinesPct: 80 } },
    } as Partial<StudyInputsBody>);
    const s = await start(big);
    const del = await t.as.engineer.delete(`${base()}/${s.id}`).set(csrf);
    expect(del.status).toBe(409);
    expect(del.body.error.message).toMatch(/cancel it before deleting/);
    expect((await t.as.engineer.post(`${base()}/${s.id}/archive`).set(csrf).send({})).status).toBe(409);
    expect((await t.as.engineer.post(`${base()}/${s.id}/cancel`).set(csrf).send({})).status).toBe(200);
    expect((await t.as.engineer.delete(`${base()}/${s.id}`).set(csrf)).status).toBe(200);
    const entry = (await audits('study.deleted')).find((a) => a.subject === 'Running')!;
    expect(JSON.parse(entry.detail)).toEqual({ studyId: s.id, status: 'cancelled' });
    const engineer = await t.deps.db('users').where({ email: 'engineer@demo.aislewright.test' }).first<{ id: number }>('id');
    expect(entry.user_id).toBe(engineer!.id);
  }, 120_000);
});

describe('candidate layouts for what-if', () => {
  it('answers a bad workbook with the floor-plan check’s own row-by-row problems and saves nothing', async () => {
    const plan = generateRectangularPlan(engineParams(PLAN));
    plan.bins[0] = { ...plan.bins[0]!, aisle: 'Q' };
    plan.bins[2] = { ...plan.bins[2]!, code: plan.bins[1]!.code };
    const file = floorPlanToWorkbook(plan);
    const before = await t.deps.db('study_layouts').count<{ n: number }[]>({ n: '*' });
    const r = await uploadLayout(file, 'bad-candidate.xlsx');
    expect(r.ok).toBe(false);
    expect(r.layout).toBeNull();
    // The same problems, row for row, as the Floor plans upload finds in that file.
    const direct = await checkFloorPlanFile(new Uint8Array(file), 'bad-candidate.xlsx');
    expect(r.errors).toEqual(direct.errors);
    expect(r.errors.map((e) => e.sheet)).toContain('bins');
    expect(r.errors.every((e) => e.row !== null && e.row > 1)).toBe(true);
    expect(await t.deps.db('study_layouts').count<{ n: number }[]>({ n: '*' })).toEqual(before);
    expect((await t.as.picker.post(`${base()}/layouts`).set(csrf).attach('file', file, 'x.xlsx')).status).toBe(403);
  });

  it('runs a what-if on an uploaded candidate: the plan itself gives no difference, a middle cross aisle gives one', async () => {
    const same = await uploadLayout(floorPlanToWorkbook(generateRectangularPlan(engineParams(PLAN))), 'same-as-now.xlsx');
    expect(same.ok).toBe(true);
    expect(same.layout).toMatchObject({ name: 'same-as-now', stats: { aisles: 6, crossAisles: 2 } });
    const middle = await uploadLayout(
      floorPlanToWorkbook(generateRectangularPlan(engineParams({ ...PLAN, crossAisles: { front: true, back: true, middle: 1 } }))),
      'middle-cross-aisle.xlsx',
    );
    expect(middle.ok).toBe(true);
    const listed = (await t.as.engineer.get(`${base()}/layouts`)).body as { id: number }[];
    expect(listed.map((l) => l.id)).toEqual(expect.arrayContaining([same.layout!.id, middle.layout!.id]));

    const s = await waitDone(
      (
        await start(
          study('Candidates', {
            whatIfs: [
              { label: 'Same layout uploaded', layoutId: same.layout!.id },
              { label: 'Candidate with a middle cross aisle', layoutId: middle.layout!.id },
            ],
          }),
        )
      ).id,
    );
    const [basePlan, sameV, middleV] = s.results.variants;
    expect(sameV!.layoutId).toBe(same.layout!.id);
    expect(middleV!.layout.crossAisles).toBe(3);
    // Identical geometry, identical work: every difference is zero (same engine, same seed).
    for (const w of s.results.whatIf.filter((x) => x.variant === 'what-if-1')) expect(w.deltaMetres).toBeCloseTo(0, 9);
    expect(sameV!.lines).toBe(basePlan!.lines);
    const sShape = s.results.whatIf.find((w) => w.variant === 'what-if-2' && w.method === 's-shape')!;
    expect(sShape.note).toBeNull();
    expect(sShape.deltaMetres).toBeCloseTo(sShape.metres! - sShape.baseMetres!, 9);
    expect(sShape.deltaMetres).not.toBe(0);
    // The maps draw the candidate's own plan.
    const drawn = await t.as.engineer.get(`${base()}/${s.id}/plans/what-if-2`);
    expect(drawn.status).toBe(200);
    expect(drawn.body.geometry.crossAisles).toHaveLength(3);
  }, 120_000);

  it('refuses a candidate that shares no bin code with the plan, and an unknown candidate, naming the what-if', async () => {
    const plan = generateRectangularPlan(engineParams(PLAN));
    plan.bins = plan.bins.map((b) => ({ ...b, code: `Z${b.code}` }));
    const other = await uploadLayout(floorPlanToWorkbook(plan), 'renamed-bins.xlsx');
    expect(other.ok).toBe(true);
    const res = await t.as.engineer
      .post(base())
      .set(csrf)
      .send(study('Renamed', { whatIfs: [{ label: 'Renamed bins', layoutId: other.layout!.id }] }));
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/none of the plan's bin codes/);
    expect(res.body.error.details).toEqual([expect.objectContaining({ field: 'whatIfs.0.layoutId' })]);
    const unknown = await t.as.engineer
      .post(base())
      .set(csrf)
      .send(study('Unknown', { whatIfs: [{ label: 'Nothing', layoutId: 987654 }] }));
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.details).toEqual([expect.objectContaining({ field: 'whatIfs.0.layoutId' })]);
  });
});
