/**
 * `aislewright bound [--time-limit-ms N]`: reads a trip as JSON on stdin (same shape as `route`) and
 * prints `{ lowerBound }`, the Held–Karp 1-tree bound in metres. Exit 2 on bad input.
 */
import type { CliIo } from '../io';
import { heldKarpBound } from '../../core/tour/index';
import { InputError, parseFlags, parseTimeLimit, parseTrip } from './trip-input';

const USAGE = 'usage: aislewright bound [--time-limit-ms N] < trip.json';

export async function run(args: string[], io: CliIo): Promise<number> {
  try {
    if (args.includes('--help') || args.includes('-h')) {
      io.out(USAGE);
      return 0;
    }
    const flags = parseFlags(args, ['time-limit-ms']);
    const timeLimitMs = parseTimeLimit(flags.get('time-limit-ms'));
    const trip = parseTrip(await io.readStdin());
    const r = heldKarpBound(trip.matrix, { depot: trip.depot, ...(timeLimitMs === undefined ? {} : { timeLimitMs }) });
    io.out(JSON.stringify({ lowerBound: r.lowerBound }));
    return 0;
  } catch (e) {
    if (e instanceof InputError) {
      io.err(`aislewright bound: ${e.message}`);
      return 2;
    }
    throw e;
  }
}
