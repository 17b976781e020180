/**
 * A study row left queued or running with no live job (its process restarted) is reported as cut off,
 * but not one saved a moment ago whose job is being submitted.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from '../../helpers/app';

describe('studies whose job is gone', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await makeTestApp();
  });
  afterAll(() => t.close());

  const insert = async (name: string, createdAt: string) => {
    const [{ id }] = await t.deps
      .db('studies')
      .insert({ site_id: t.siteId, name, kind: 'generated', seed: 1, inputs: '{}', status: 'running', created_at: createdAt }, 'id');
    return id as number;
  };

  it('marks a running study with no job as failed after a restart, and leaves one just saved alone', async () => {
    const old = await insert('Cut off by a restart', new Date(Date.now() - 10 * 60_000).toISOString());
    const fresh = await insert('Just saved', new Date().toISOString());
    const res = await t.as.engineer.get(`/api/sites/${t.siteId}/studies`);
    expect(res.status).toBe(200);
    const byId = new Map((res.body as { id: number; status: string; error: string | null }[]).map((s) => [s.id, s]));
    expect(byId.get(old)!.status).toBe('failed');
    expect(byId.get(old)!.error).toBe('The server restarted while this study ran; rerun it');
    expect(byId.get(fresh)!.status).toBe('running');
    expect((await t.deps.db('studies').where({ id: old }).first<{ status: string }>())!.status).toBe('failed');
  });
});
