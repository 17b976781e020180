/**
 * `aislewright <command> …` — one entry, one module per command under ./commands. Each module
 * exports `run(args: string[], io: CliIo): Promise<number>` returning the exit code.
 */
import type { CliIo } from './io';
import { processIo } from './io';

const commands: Record<string, () => Promise<{ run: (args: string[], io: CliIo) => Promise<number> }>> = {
  route: () => import('./commands/route'),
  bound: () => import('./commands/bound'),
  plan: () => import('./commands/plan'),
  waves: () => import('./commands/waves'),
  slotting: () => import('./commands/slotting'),
  backup: () => import('./commands/backup'),
};

const usage = `usage: aislewright <command> [options]
commands:
  route   sequence a closed circuit from JSON on stdin
  bound   Held–Karp lower bound for JSON on stdin
  plan    check a floor-plan workbook, or measure a walking distance on it
  waves   batch and route orders on a floor plan
  slotting  choose bins for SKUs from an order history and write the new SKU master
  backup  create, verify or restore a backup of the database (DATABASE_FILE)`;

async function main(argv: string[]): Promise<number> {
  const [name, ...rest] = argv;
  const io = processIo();
  if (!name || name === '--help' || name === '-h') {
    io.out(usage);
    return name ? 0 : 2;
  }
  const load = commands[name];
  if (!load) {
    io.err(`aislewright: unknown command '${name}'\n${usage}`);
    return 2;
  }
  const mod = await load();
  return mod.run(rest, io);
}

process.exitCode = await main(process.argv.slice(2));
