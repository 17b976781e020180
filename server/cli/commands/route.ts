/**
 * `aislewright route --method M [--improve none|local|deep] [--time-limit-ms N] [--seed N]`: reads a
 * trip as JSON on stdin and prints `{ method, improve, order, length, ms }`. Exit 2 on bad input.
 */
import type { CliIo } from '../io';
import type { ImproveMode, TourMethod } from '../../core/tour/index';
import { HELD_KARP_MAX_POINTS, IMPROVE_MODES, isTimeLimitError, solveTour, TOUR_METHODS } from '../../core/tour/index';
import { InputError, parseFlags, parseTimeLimit, parseTrip } from './trip-input';

const USAGE = `usage: aislewright route --method ${TOUR_METHODS.join('|')} [--improve ${IMPROVE_MODES.join('|')}] [--time-limit-ms N] [--seed N] < trip.json`;

export async function run(args: string[], io: CliIo): Promise<number> {
  try {
    if (args.includes('--help') || args.includes('-h')) {
      io.out(USAGE);
      return 0;
    }
    const flags = parseFlags(args, ['method', 'improve', 'time-limit-ms', 'seed']);
    const method = flags.get('method');
    if (method === undefined) throw new InputError(`--method is required (${TOUR_METHODS.join(', ')})`);
    if (!(TOUR_METHODS as readonly string[]).includes(method)) {
      throw new InputError(`unknown method '${method}' (expected ${TOUR_METHODS.join(', ')})`);
    }
    const improve = flags.get('improve') ?? 'none';
    if (!(IMPROVE_MODES as readonly string[]).includes(improve)) {
      throw new InputError(`unknown improve mode '${improve}' (expected ${IMPROVE_MODES.join(', ')})`);
    }
    const timeLimitMs = parseTimeLimit(flags.get('time-limit-ms'));
    const seedText = flags.get('seed');
    const seed = seedText === undefined ? undefined : Number(seedText);
    if (seed !== undefined && !Number.isSafeInteger(seed)) throw new InputError(`--seed must be an integer, got '${seedText}'`);

    const trip = parseTrip(await io.readStdin());
    if (method === 'exact' && trip.matrix.n > HELD_KARP_MAX_POINTS) {
      throw new InputError(`exact is limited to ${HELD_KARP_MAX_POINTS - 1} stops; this trip has ${trip.matrix.n - 1}`);
    }
    const r = solveTour(trip.matrix, {
      method: method as TourMethod,
      improve: improve as ImproveMode,
      depot: trip.depot,
      ...(timeLimitMs === undefined ? {} : { timeLimitMs }),
      ...(seed === undefined ? {} : { seed }),
    });
    io.out(JSON.stringify({ method: r.method, improve: r.improve, order: r.order, length: r.length, ms: Math.round(r.ms * 1000) / 1000 }));
    return 0;
  } catch (e) {
    if (e instanceof InputError) {
      io.err(`aislewright route: ${e.message}`);
      return 2;
    }
    if (isTimeLimitError(e)) {
      io.err(`aislewright route: ${e.message}; raise --time-limit-ms`);
      return 1;
    }
    throw e;
  }
}
