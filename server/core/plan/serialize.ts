/**
 * Walk graph and distance index ⇄ a small JSON header plus one byte array per typed array, so the
 * server can store each array as a SQLite BLOB and load it back without parsing numbers.
 * Byte order is the platform's (little-endian on every machine we ship to); the header records it
 * and loading refuses a mismatch rather than reading garbage.
 */
import type { DistanceIndex } from './distances';
import type { WalkGraph } from './walk-graph';

export interface SerializedArrays {
  /** Header: format, version, scalar fields, and the element type and length of every blob. */
  json: string;
  /** One entry per typed array, viewing the original memory (no copy). */
  blobs: Record<string, Uint8Array>;
  /** Bytes of all blobs plus the header's UTF-8 length. */
  byteLength: number;
}

type ArrayType = 'f64' | 'i32' | 'u8';
type Typed = Float64Array | Int32Array | Uint8Array;

interface Header {
  format: string;
  version: number;
  littleEndian: boolean;
  scalars: Record<string, number>;
  arrays: Record<string, { type: ArrayType; length: number }>;
}

const LITTLE_ENDIAN = new Uint8Array(Uint16Array.of(1).buffer)[0] === 1;
const GRAPH_FORMAT = 'aislewright.walk-graph';
const INDEX_FORMAT = 'aislewright.distance-index';
const VERSION = 1;

const GRAPH_ARRAYS = {
  x: 'f64',
  y: 'f64',
  kind: 'u8',
  aisle: 'i32',
  crossAisle: 'i32',
  offsets: 'i32',
  targets: 'i32',
  lengths: 'f64',
  binNode: 'i32',
  depotNode: 'i32',
  depotLink: 'i32',
} as const satisfies Record<string, ArrayType>;

const INDEX_ARRAYS = {
  hubNode: 'i32',
  hubDist: 'f64',
  anchorHub: 'i32',
  anchorDist: 'f64',
  chain: 'i32',
} as const satisfies Record<string, ArrayType>;

/** Serialises a walk graph. O(1) apart from the header; blobs share the graph's memory. */
export function serializeWalkGraph(graph: WalkGraph): SerializedArrays {
  return pack(GRAPH_FORMAT, { nodeCount: graph.nodeCount }, GRAPH_ARRAYS, graph as unknown as Record<string, Typed>);
}

/** Serialises a distance index. */
export function serializeDistanceIndex(index: DistanceIndex): SerializedArrays {
  return pack(INDEX_FORMAT, { nodeCount: index.nodeCount, hubCount: index.hubCount }, INDEX_ARRAYS, index as unknown as Record<string, Typed>);
}

/** Rebuilds a walk graph; throws RangeError when the header or a blob does not match. O(size) when blobs must be copied for alignment, else O(1). */
export function deserializeWalkGraph(data: { json: string; blobs: Record<string, Uint8Array> }): WalkGraph {
  const { scalars, arrays } = unpack(GRAPH_FORMAT, data, GRAPH_ARRAYS, ['nodeCount']);
  const nodeCount = scalars.nodeCount!;
  const g = arrays as unknown as Omit<WalkGraph, 'nodeCount'>;
  if (g.x.length !== nodeCount || g.offsets.length !== nodeCount + 1 || g.targets.length !== g.lengths.length) {
    throw new RangeError('walk graph blobs do not match its node count');
  }
  return { nodeCount, ...g };
}

/** Rebuilds a distance index; throws RangeError when the header or a blob does not match. */
export function deserializeDistanceIndex(data: { json: string; blobs: Record<string, Uint8Array> }): DistanceIndex {
  const { scalars, arrays } = unpack(INDEX_FORMAT, data, INDEX_ARRAYS, ['nodeCount', 'hubCount']);
  const nodeCount = scalars.nodeCount!;
  const hubCount = scalars.hubCount!;
  const ix = arrays as unknown as Omit<DistanceIndex, 'nodeCount' | 'hubCount'>;
  if (ix.hubDist.length !== hubCount * hubCount || ix.chain.length !== nodeCount || ix.anchorHub.length !== 2 * nodeCount) {
    throw new RangeError('distance index blobs do not match its counts');
  }
  return { nodeCount, hubCount, ...ix };
}

function pack(format: string, scalars: Record<string, number>, spec: Record<string, ArrayType>, source: Record<string, Typed>): SerializedArrays {
  const header: Header = { format, version: VERSION, littleEndian: LITTLE_ENDIAN, scalars, arrays: {} };
  const blobs: Record<string, Uint8Array> = {};
  let byteLength = 0;
  for (const [name, type] of Object.entries(spec)) {
    const arr = source[name]!;
    header.arrays[name] = { type, length: arr.length };
    blobs[name] = new Uint8Array(arr.buffer, arr.byteOffset, arr.byteLength);
    byteLength += arr.byteLength;
  }
  const json = JSON.stringify(header);
  byteLength += new TextEncoder().encode(json).length;
  return { json, blobs, byteLength };
}

function unpack(
  format: string,
  data: { json: string; blobs: Record<string, Uint8Array> },
  spec: Record<string, ArrayType>,
  scalarNames: string[],
): { scalars: Record<string, number>; arrays: Record<string, Typed> } {
  const header = JSON.parse(data.json) as Header;
  if (header.format !== format) throw new RangeError(`expected ${format}, got ${String(header.format)}`);
  if (header.version !== VERSION) throw new RangeError(`${format} version ${header.version} is not supported`);
  if (header.littleEndian !== LITTLE_ENDIAN) throw new RangeError(`${format} was written with the other byte order`);
  const arrays: Record<string, Typed> = {};
  for (const [name, type] of Object.entries(spec)) {
    const meta = header.arrays?.[name];
    const blob = data.blobs[name];
    if (!meta || meta.type !== type || !blob) throw new RangeError(`${format}: array ${name} is missing or of the wrong type`);
    const size = type === 'f64' ? 8 : type === 'i32' ? 4 : 1;
    if (blob.byteLength !== meta.length * size) throw new RangeError(`${format}: array ${name} has ${blob.byteLength} bytes, expected ${meta.length * size}`);
    // A BLOB read back from SQLite (or a Buffer passed to a job process) may start at any byte; typed
    // views need aligned offsets. `new Uint8Array(view)` copies: a Buffer's own slice() would not.
    const aligned = blob.byteOffset % size === 0 ? blob : new Uint8Array(blob);
    arrays[name] =
      type === 'f64'
        ? new Float64Array(aligned.buffer, aligned.byteOffset, meta.length)
        : type === 'i32'
          ? new Int32Array(aligned.buffer, aligned.byteOffset, meta.length)
          : new Uint8Array(aligned.buffer, aligned.byteOffset, meta.length);
  }
  for (const k of scalarNames) {
    const v = header.scalars?.[k];
    if (typeof v !== 'number' || !Number.isInteger(v) || v < 0) throw new RangeError(`${format}: ${k} must be a non-negative integer`);
  }
  return { scalars: header.scalars, arrays };
}
