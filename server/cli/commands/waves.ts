/**
 * `aislewright waves plan --plan PLAN.xlsx --skus SKUS.xlsx --orders ORDERS.xlsx
 *   --cart totes=8,kg=150,litres=400 --batching single|fcfs|seed|savings|search
 *   [--routing METHOD] [--improve none|local|deep] [--depot CODE] [--time-limit-ms N]`
 * Prints `{ trips: [{ orders, stops: [{ n, bins, lines }], metres, … }], totalMetres, unplaced, comparison }`.
 * Exit 2 on bad flags or files (the file's problems are listed one per line on stderr).
 */
import type { CliIo } from '../io';
import type { BatchingMethod, Cart, Unplaced } from '../../core/batch/types';
import { BATCHING_METHODS } from '../../core/batch/types';
import type { PlanWaveResult } from '../../core/batch/plan-wave';
import { planWave } from '../../core/batch/plan-wave';
import type { ImproveMode, TourMethod } from '../../core/tour/index';
import { IMPROVE_MODES, TOUR_METHODS } from '../../core/tour/index';
import { readWaveInputs } from '../../waves/cli-inputs';
import { issueLine, readNamed } from './files';
import { InputError, parseFlags, parseTimeLimit } from './trip-input';

const USAGE = `usage: aislewright waves plan --plan PLAN.xlsx --skus SKUS.xlsx --orders ORDERS.xlsx --cart totes=8,kg=150,litres=400 --batching ${BATCHING_METHODS.join('|')} [--routing ${TOUR_METHODS.join('|')}] [--improve ${IMPROVE_MODES.join('|')}] [--depot CODE] [--time-limit-ms N]`;

/** `totes=8,kg=150,litres=400` → a cart; every key once, each a positive number (totes whole). */
export function parseCart(text: string): Cart {
  const values = new Map<string, number>();
  for (const part of text.split(',')) {
    const [key, value, ...rest] = part.split('=').map((s) => s.trim());
    if (!key || value === undefined || rest.length > 0) throw new InputError(`--cart '${text}': write it as totes=8,kg=150,litres=400`);
    if (!['totes', 'kg', 'litres'].includes(key)) throw new InputError(`--cart: unknown key '${key}' (expected totes, kg, litres)`);
    if (values.has(key)) throw new InputError(`--cart: ${key} is given twice`);
    const n = Number(value);
    if (!Number.isFinite(n) || n <= 0) throw new InputError(`--cart: ${key} must be a positive number, got '${value}'`);
    if (key === 'totes' && !Number.isInteger(n)) throw new InputError(`--cart: totes must be a whole number, got '${value}'`);
    values.set(key, n);
  }
  for (const key of ['totes', 'kg', 'litres']) if (!values.has(key)) throw new InputError(`--cart: ${key} is missing (totes=8,kg=150,litres=400)`);
  return { totes: values.get('totes')!, maxKg: values.get('kg')!, maxLitres: values.get('litres')! };
}

const metres = (v: number): number => Math.round(v * 100) / 100;
const pct = (v: number | null): number | null => (v === null ? null : Math.round(v * 10) / 10);

/** The JSON the command prints: the wave as a supervisor reads it, metres to the centimetre. */
export function waveOutput(wave: PlanWaveResult, unplacedBefore: readonly Unplaced[]) {
  return {
    trips: wave.trips.map((t) => ({
      n: t.n,
      orders: t.orders.map((o) => o.ref),
      totes: Object.fromEntries(t.orders.map((o) => [o.ref, o.totes])),
      kg: metres(t.kg),
      litres: metres(t.litres),
      stops: t.stops.map((s) => ({ n: s.n, bins: s.bins, lines: s.lines.map((l) => ({ order: l.order, sku: l.sku, qty: l.qty, bin: l.bin, tote: l.tote })) })),
      metres: metres(t.metres),
      minutes: Math.round(t.minutes * 10) / 10,
      lowerBound: metres(t.lowerBound),
      aboveBoundPct: pct(t.aboveBoundPct),
    })),
    totalMetres: metres(wave.totals.metres),
    unplaced: [...unplacedBefore, ...wave.unplaced].map((u) => ({ order: u.order, reason: u.reason })),
    comparison: {
      singleMetres: metres(wave.totals.singleMetres),
      savingVsSinglePct: pct(wave.totals.savingVsSinglePct),
      sShapeMetres: wave.totals.sShapeMetres === null ? null : metres(wave.totals.sShapeMetres),
      savingVsSShapePct: pct(wave.totals.savingVsSShapePct),
      ...(wave.totals.sShapeNote ? { sShapeNote: wave.totals.sShapeNote } : {}),
      lowerBound: metres(wave.totals.lowerBound),
      aboveBoundPct: pct(wave.totals.aboveBoundPct),
    },
    batching: wave.batching.method,
    routing: wave.routing,
    notes: wave.notes,
    ms: Math.round(wave.ms),
  };
}

export async function run(args: string[], io: CliIo): Promise<number> {
  try {
    const [sub, ...rest] = args;
    if (!sub || sub === '--help' || sub === '-h' || rest.includes('--help')) {
      io.out(USAGE);
      return sub ? 0 : 2;
    }
    if (sub !== 'plan') throw new InputError(`unknown subcommand '${sub}' (expected plan)`);
    const flags = parseFlags(rest, ['plan', 'skus', 'orders', 'cart', 'batching', 'routing', 'improve', 'depot', 'time-limit-ms']);
    for (const f of ['plan', 'skus', 'orders', 'cart', 'batching']) if (!flags.has(f)) throw new InputError(`--${f} is required`);
    const batching = flags.get('batching')!;
    if (!(BATCHING_METHODS as readonly string[]).includes(batching))
      throw new InputError(`unknown batching '${batching}' (expected ${BATCHING_METHODS.join(', ')})`);
    const method = flags.get('routing') ?? 'best';
    if (!(TOUR_METHODS as readonly string[]).includes(method)) throw new InputError(`unknown routing '${method}' (expected ${TOUR_METHODS.join(', ')})`);
    const improve = flags.get('improve') ?? 'local';
    if (!(IMPROVE_MODES as readonly string[]).includes(improve))
      throw new InputError(`unknown improve mode '${improve}' (expected ${IMPROVE_MODES.join(', ')})`);
    const cart = parseCart(flags.get('cart')!);
    const timeLimitMs = parseTimeLimit(flags.get('time-limit-ms'));

    const files = {
      plan: await readNamed(flags.get('plan')!, 'plan'),
      skus: await readNamed(flags.get('skus')!, 'skus'),
      orders: await readNamed(flags.get('orders')!, 'orders'),
    };
    const depot = flags.get('depot');
    const inputs = await readWaveInputs(files, depot === undefined ? {} : { depot });
    if (!inputs.ok) {
      io.err(`aislewright waves: the ${inputs.file} file has ${inputs.errors.length} problem(s); nothing was planned`);
      for (const e of inputs.errors) io.err(`  ${issueLine(e)}`);
      return 2;
    }
    const wave = planWave({
      orders: inputs.orders,
      cart,
      batching: batching as BatchingMethod,
      routing: { method: method as TourMethod, improve: improve as ImproveMode },
      depotNode: inputs.depotNode,
      distance: inputs.distance,
      ...('layout' in inputs.policy ? { policyLayout: inputs.policy } : {}),
      ...(timeLimitMs === undefined ? {} : { timeLimitMs }),
    });
    const out = waveOutput(wave, inputs.unplaced);
    if (!('layout' in inputs.policy)) out.comparison.sShapeNote = `no S-shape figure: ${inputs.policy.reason}`;
    io.out(JSON.stringify(out, null, 2));
    return 0;
  } catch (e) {
    if (e instanceof InputError) {
      io.err(`aislewright waves: ${e.message}`);
      return 2;
    }
    throw e;
  }
}
