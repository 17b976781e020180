import { existsSync, readFileSync } from 'node:fs';

/**
 * After a browser run: the web server's log holds no answer with a 5xx status and no unhandled error.
 * The server logs those at pino's level 50 (error) or above, so they are there even at LOG_LEVEL=warn.
 */
export function serverErrorsIn(log: string): string[] {
  const found: string[] = [];
  for (const line of log.split('\n')) {
    if (!line.startsWith('{')) continue;
    let entry: { level?: number; msg?: string; res?: { statusCode?: number }; req?: { method?: string; url?: string } };
    try {
      entry = JSON.parse(line) as typeof entry;
    } catch {
      continue;
    }
    const status = entry.res?.statusCode ?? 0;
    if (status >= 500 || (entry.level ?? 0) >= 50) found.push(`${entry.req?.method ?? ''} ${entry.req?.url ?? ''} ${status || ''} ${entry.msg ?? ''}`.trim());
  }
  return found;
}

export default function serverLogCheck(): void {
  const port = Number(process.env.E2E_PORT ?? 3310);
  const file = `test-results/e2e-db-${port}/server.log`;
  if (!existsSync(file)) return;
  const errors = serverErrorsIn(readFileSync(file, 'utf8'));
  if (errors.length > 0) throw new Error(`The web server answered with a server error during the browser run (${file}):\n${errors.slice(0, 20).join('\n')}`);
}
