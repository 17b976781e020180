import { describe, expect, it } from 'vitest';
import { createRng } from '../../../server/core/rng';
import { buildDistanceIndex, pairDistance } from '../../../server/core/plan/distances';
import { deserializeDistanceIndex, deserializeWalkGraph, serializeDistanceIndex, serializeWalkGraph } from '../../../server/core/plan/serialize';
import type { SerializedArrays } from '../../../server/core/plan/serialize';
import { buildWalkGraph } from '../../../server/core/plan/walk-graph';
import { randomIrregularPlan } from './fixtures';

/** What a database round trip may hand back: copies of the bytes, starting at an odd offset of a larger buffer. */
function throughStorage(s: SerializedArrays): { json: string; blobs: Record<string, Uint8Array> } {
  const blobs: Record<string, Uint8Array> = {};
  for (const [name, blob] of Object.entries(s.blobs)) {
    const host = new Uint8Array(blob.byteLength + 3);
    host.set(blob, 1);
    blobs[name] = host.subarray(1, 1 + blob.byteLength);
  }
  return { json: String(s.json), blobs };
}

describe('serialise and deserialise', () => {
  const { plan, closures } = randomIrregularPlan(createRng(5));
  const graph = buildWalkGraph(plan, closures);
  const index = buildDistanceIndex(graph);

  it('round-trips the walk graph through misaligned byte copies', () => {
    const back = deserializeWalkGraph(throughStorage(serializeWalkGraph(graph)));
    expect(back).toEqual(graph);
  });

  it('round-trips through misaligned Node Buffers, whose slice() is a view, not a copy', () => {
    // Buffers are what SQLite hands back and what a job process receives (advanced IPC serialisation).
    const s = throughStorage(serializeDistanceIndex(index));
    const buffers = Object.fromEntries(Object.entries(s.blobs).map(([k, v]) => [k, Buffer.from(v.buffer, v.byteOffset, v.byteLength)]));
    expect(Object.values(buffers).some((b) => b.byteOffset % 8 !== 0)).toBe(true);
    expect(deserializeDistanceIndex({ json: s.json, blobs: buffers })).toEqual(index);
  });

  it('round-trips the distance index, answering every pair the same', () => {
    const back = deserializeDistanceIndex(throughStorage(serializeDistanceIndex(index)));
    expect(back).toEqual(index);
    for (let a = 0; a < graph.nodeCount; a++) for (let b = 0; b < graph.nodeCount; b++) expect(pairDistance(back, a, b)).toBe(pairDistance(index, a, b));
  });

  it('reports its size as the bytes of the blobs plus the header', () => {
    const s = serializeDistanceIndex(index);
    const blobBytes = Object.values(s.blobs).reduce((sum, b) => sum + b.byteLength, 0);
    expect(s.byteLength).toBe(blobBytes + s.json.length);
    expect(blobBytes).toBe(index.hubCount ** 2 * 8 + index.hubCount * 4 + graph.nodeCount * (8 + 16 + 4));
  });

  it('refuses a header of another format, a truncated blob and a missing count', () => {
    const g = serializeWalkGraph(graph);
    const ix = serializeDistanceIndex(index);
    expect(() => deserializeWalkGraph(ix)).toThrow(/expected aislewright.walk-graph/);
    const cut = { ...g.blobs, x: g.blobs.x!.subarray(0, 8) };
    expect(() => deserializeWalkGraph({ json: g.json, blobs: cut })).toThrow(/array x has 8 bytes/);
    const header = JSON.parse(ix.json) as { scalars: Record<string, number> };
    delete header.scalars.hubCount;
    expect(() => deserializeDistanceIndex({ json: JSON.stringify(header), blobs: ix.blobs })).toThrow(/hubCount/);
  });
});
