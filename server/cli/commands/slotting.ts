/**
 * `aislewright slotting --plan PLAN.xlsx --skus SKUS.xlsx --history ORDERS.xlsx [--max-moves N]
 *   [--method popularity|cube-per-order|search] --out NEW-SKUS.xlsx`
 * Learns from the earlier days of the history (each order's day is the date of its `due` column, UTC;
 * orders without one form one day), writes the new SKU master in the import format, and prints
 * `{ moves, moveCount, metresBefore, metresAfter, … }` (whole history; `test` holds the later days the
 * method did not learn from). Bad flags or files: one line on stderr, exit 2.
 */
import { writeFile } from 'node:fs/promises';
import type { CliIo } from '../io';
import type { HistoryOrder } from '../../core/slotting/types';
import { SLOTTING_METHODS, type SlottingMethod } from '../../core/slotting/types';
import { planSlotting } from '../../core/slotting/index';
import { slotBinsOf } from '../../core/slotting/generate';
import { readTableFile } from '../../orders/orders.files';
import { validateOrderRows } from '../../orders/orders.validate';
import { newSkuMasterWorkbook } from '../../slotting/workbooks';
import { readSiteFiles } from '../../waves/cli-inputs';
import { issueLine, readNamed } from './files';
import { InputError, parseFlags, parseTimeLimit } from './trip-input';
import { parseCart } from './waves';

const FLAGS = [
  'plan',
  'skus',
  'history',
  'max-moves',
  'method',
  'out',
  'cart',
  'depot',
  'pin-zone',
  'heavy-kg',
  'heavy-max-level',
  'learn-share',
  'time-limit-ms',
];
const USAGE = `usage: aislewright slotting --plan PLAN.xlsx --skus SKUS.xlsx --history ORDERS.xlsx [--max-moves N] [--method ${SLOTTING_METHODS.join('|')}] --out NEW-SKUS.xlsx
  [--cart totes=8,kg=150,litres=400] [--depot CODE] [--pin-zone ZONE[,ZONE…]] [--heavy-kg KG --heavy-max-level LEVEL] [--learn-share 0.67] [--time-limit-ms N]`;

const DAY_MS = 86_400_000;
const round = (v: number, places = 1) => Math.round(v * 10 ** places) / 10 ** places;

function positiveNumber(flags: Map<string, string>, name: string, whole: boolean): number | undefined {
  const v = flags.get(name);
  if (v === undefined) return undefined;
  const n = Number(v);
  if (!Number.isFinite(n) || n < 0 || (whole && !Number.isInteger(n)))
    throw new InputError(`--${name} must be a ${whole ? 'whole ' : ''}number ≥ 0, got '${v}'`);
  return n;
}

export async function run(args: string[], io: CliIo): Promise<number> {
  try {
    if (args.length === 0 || args.includes('--help') || args.includes('-h')) {
      io.out(USAGE);
      return args.length === 0 ? 2 : 0;
    }
    const flags = parseFlags(args, FLAGS);
    for (const f of ['plan', 'skus', 'history', 'out']) if (!flags.has(f)) throw new InputError(`--${f} is required`);
    const method = flags.get('method') ?? 'search';
    if (!(SLOTTING_METHODS as readonly string[]).includes(method)) throw new InputError(`unknown method '${method}' (expected ${SLOTTING_METHODS.join(', ')})`);
    const maxMoves = positiveNumber(flags, 'max-moves', true);
    const heavyKg = positiveNumber(flags, 'heavy-kg', false);
    const heavyLevel = positiveNumber(flags, 'heavy-max-level', true);
    if ((heavyKg === undefined) !== (heavyLevel === undefined)) throw new InputError('--heavy-kg and --heavy-max-level go together');
    const learnShare = positiveNumber(flags, 'learn-share', false);
    if (learnShare !== undefined && !(learnShare > 0 && learnShare <= 1)) throw new InputError('--learn-share must lie above 0 and at most 1');
    const cart = parseCart(flags.get('cart') ?? 'totes=8,kg=150,litres=400');
    const timeLimitMs = parseTimeLimit(flags.get('time-limit-ms'));
    const depot = flags.get('depot');

    const site = await readSiteFiles(
      { plan: await readNamed(flags.get('plan')!, 'plan'), skus: await readNamed(flags.get('skus')!, 'skus') },
      depot === undefined ? {} : { depot },
    );
    if (!site.ok) throw new InputError(`the ${site.file} file has ${site.errors.length} problem(s), first: ${issueLine(site.errors[0]!)}; nothing was written`);
    const history = await readNamed(flags.get('history')!, 'history');
    const read = await readTableFile(history.bytes, history.name, 'orders');
    if ('issues' in read) throw new InputError(`the history file cannot be read: ${issueLine(read.issues[0]!)}`);
    const checked = validateOrderRows('orders', read.rows, (sku) => site.skus.has(sku));
    if (checked.errors.length > 0)
      throw new InputError(`the history file has ${checked.errors.length} problem(s), first: ${issueLine(checked.errors[0]!)}; nothing was written`);
    if (checked.orders.length === 0) throw new InputError('the history file holds no orders');
    const orders: HistoryOrder[] = checked.orders.map((o) => ({
      ref: o.ref,
      day: o.due === null ? 0 : Math.floor(Date.parse(o.due) / DAY_MS),
      lines: o.lines,
    }));

    const zones = new Set(
      (flags.get('pin-zone') ?? '')
        .split(',')
        .map((z) => z.trim())
        .filter(Boolean),
    );
    const pinned = new Set(site.plan.bins.filter((b) => b.zone !== null && zones.has(b.zone)).map((b) => b.code));
    const result = planSlotting({
      bins: slotBinsOf(site.plan, site.graph, pinned),
      skus: site.skuRecords.map((s) => ({ code: s.sku, bin: s.bin, unitKg: s.unitWeightKg, unitLitres: s.unitVolumeL })),
      history: orders,
      method: method as SlottingMethod,
      depotNode: site.depotNode,
      distance: site.distance,
      cart,
      ...(maxMoves === undefined ? {} : { maxMoves }),
      ...(heavyKg === undefined ? {} : { weightRule: { minUnitKg: heavyKg, maxLevel: heavyLevel! } }),
      ...(learnShare === undefined ? {} : { learnFraction: learnShare }),
      ...(timeLimitMs === undefined ? {} : { timeLimitMs }),
    });
    const out = flags.get('out')!;
    try {
      await writeFile(out, newSkuMasterWorkbook(site.skuRecords, result.assignment));
    } catch (e) {
      throw new InputError(`--out ${out}: ${(e as Error).message}`);
    }
    const f = result.figures;
    const period = (p: typeof f.test) => ({
      days: p.days,
      orders: p.orders,
      metresBefore: round(p.metresBefore),
      metresAfter: round(p.metresAfter),
      savingPct: round(p.savingPct),
      pickerHoursPerDay: round(p.pickerHoursPerDay, 2),
    });
    io.out(
      JSON.stringify(
        {
          method: result.method,
          moveCount: result.moves.length,
          metresBefore: round(f.whole.metresBefore),
          metresAfter: round(f.whole.metresAfter),
          savingPct: round(f.whole.savingPct),
          learn: period(f.learn),
          test: period(f.test),
          moves: result.moves.map((m) => ({
            sku: m.sku,
            fromBin: m.fromBin,
            toBin: m.toBin,
            picksPerDay: round(m.picksPerDay, 2),
            estSavingMPerDay: round(m.estSavingMPerDay),
          })),
          notes: result.notes,
          out,
          ms: Math.round(result.ms),
        },
        null,
        2,
      ),
    );
    return 0;
  } catch (e) {
    if (e instanceof InputError) {
      io.err(`aislewright slotting: ${e.message}`);
      return 2;
    }
    throw e;
  }
}
