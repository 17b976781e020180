// Entry of a job process (server/workers/spawn.ts runInWorker): registers tsx's loader, then imports
// the job module named in argv[2], which calls serveJob. Plain JavaScript, as nothing loads .ts yet.
import { register } from 'tsx/esm/api';

register();
await import(process.argv[2]);
