/**
 * `aislewright plan check FILE [--layout PLAN.xlsx]` prints `{ ok, errors, warnings, stats }` (exit 1
 * on errors); `aislewright plan distance FILE --from CODE --to CODE` prints `{ metres }`, the shortest
 * walking distance between two bins or depots; `aislewright plan template OUT.xlsx` writes the
 * template. Bad usage, unreadable paths and unknown codes: one line on stderr, exit 2.
 */
import { readFile, writeFile } from 'node:fs/promises';
import { resolve } from 'node:path';
import type { CliIo } from '../io';
import { buildDistanceIndex, pairDistance } from '../../core/plan/distances';
import { buildWalkGraph } from '../../core/plan/walk-graph';
import type { PlanLayout } from '../../floor-plans/import/index';
import { buildFloorPlanTemplate, checkFloorPlanFile } from '../../floor-plans/import/index';
import { InputError, parseFlags } from './trip-input';

const USAGE = `usage: aislewright plan check FILE.xlsx|BINS.csv [--layout PLAN.xlsx]
       aislewright plan distance FILE.xlsx --from CODE --to CODE
       aislewright plan template OUT.xlsx`;

export async function run(args: string[], io: CliIo): Promise<number> {
  const [sub, file, ...rest] = args;
  try {
    if (sub === '--help' || sub === '-h' || args.includes('--help')) {
      io.out(USAGE);
      return 0;
    }
    if (sub === undefined) throw new InputError('a subcommand is required (check, distance, template)');
    if (file === undefined || file.startsWith('--')) throw new InputError(`plan ${sub} needs a file name`);
    switch (sub) {
      case 'check':
        return await check(file, parseFlags(rest, ['layout']), io);
      case 'distance':
        return await distance(file, parseFlags(rest, ['from', 'to']), io);
      case 'template':
        if (rest.length > 0) throw new InputError(`unexpected argument '${rest[0]}'`);
        await writeFile(resolve(file), buildFloorPlanTemplate());
        io.out(JSON.stringify({ written: file }));
        return 0;
      default:
        throw new InputError(`unknown subcommand '${sub}' (expected check, distance, template)`);
    }
  } catch (e) {
    if (e instanceof InputError) {
      io.err(`aislewright plan: ${e.message}`);
      return 2;
    }
    throw e;
  }
}

async function readInput(file: string): Promise<Uint8Array> {
  try {
    return new Uint8Array(await readFile(resolve(file)));
  } catch (e) {
    throw new InputError(`cannot read ${file} (${(e as NodeJS.ErrnoException).code ?? 'error'})`);
  }
}

async function check(file: string, flags: Map<string, string>, io: CliIo): Promise<number> {
  const bytes = await readInput(file);
  let layout: PlanLayout | undefined;
  const layoutFile = flags.get('layout');
  if (layoutFile !== undefined) {
    const base = await checkFloorPlanFile(await readInput(layoutFile), layoutFile);
    if (!base.plan) throw new InputError(`the layout ${layoutFile} has ${base.errors.length} errors; run aislewright plan check ${layoutFile}`);
    layout = { aisles: base.plan.aisles, crossAisles: base.plan.crossAisles, depots: base.plan.depots };
  }
  const r = await checkFloorPlanFile(bytes, file, layout ? { layout } : {});
  io.out(JSON.stringify({ ok: r.ok, errors: r.errors, warnings: r.warnings, stats: r.stats }, null, 2));
  return r.ok ? 0 : 1;
}

async function distance(file: string, flags: Map<string, string>, io: CliIo): Promise<number> {
  const from = flags.get('from');
  const to = flags.get('to');
  if (from === undefined || to === undefined) throw new InputError('both --from and --to are required');
  const r = await checkFloorPlanFile(await readInput(file), file);
  if (!r.plan) {
    io.err(`aislewright plan: ${file} has ${r.errors.length} errors; run aislewright plan check ${file}`);
    return 1;
  }
  const plan = r.plan;
  const graph = buildWalkGraph(plan);
  const nodeOf = (code: string): number => {
    const b = plan.bins.findIndex((bin) => bin.code === code);
    if (b >= 0) return graph.binNode[b]!;
    const d = plan.depots.findIndex((depot) => depot.code === code);
    if (d >= 0) return graph.depotNode[d]!;
    throw new InputError(`unknown bin or depot '${code}' in ${file}`);
  };
  const a = nodeOf(from);
  const b = nodeOf(to);
  const metres = pairDistance(buildDistanceIndex(graph), a, b);
  if (!Number.isFinite(metres)) {
    io.err(`aislewright plan: no walkable path joins ${from} and ${to}`);
    return 1;
  }
  // Sums of metre lengths carry float noise far below a millimetre; print to the micrometre.
  io.out(JSON.stringify({ metres: Math.round(metres * 1e6) / 1e6 }));
  return 0;
}
