/** Worker entry for `readSpreadsheetFile`: reads one file and posts its rows back. */
import { serveJob } from '../workers/worker-protocol';
import type { ReadJob } from './run';
import type { SpreadsheetRead } from './spreadsheet';
import { readSpreadsheet } from './spreadsheet';

serveJob<ReadJob, number, SpreadsheetRead>((job, progress) => readSpreadsheet(job.bytes, job.filename, job.spec, job.limits, progress));
