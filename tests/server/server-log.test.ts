import { Writable } from 'node:stream';
import { pino } from 'pino';
import request from 'supertest';
import { afterEach, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app';
import type { Deps } from '../../server/deps';
import { serverErrorsIn } from '../e2e/harness/server-log-check';
import { csrf, dropTestDb, makeDeps } from '../helpers/app';

// The browser run's teardown (tests/e2e/harness/server-log-check.ts) reads the web server's log for
// 5xx answers; this checks that such answers are in the log at the level the browser run uses (warn)
// and that ordinary 4xx answers are not taken for them.
describe('server log at LOG_LEVEL=warn', () => {
  let deps: Deps | undefined;
  afterEach(async () => {
    if (deps) {
      deps.boardStreams.close();
      await dropTestDb(deps.db).catch(() => undefined);
    }
    deps = undefined;
  });

  it('holds a 5xx answer, and the log check finds it; a 404 is not listed', async () => {
    deps = await makeDeps();
    let log = '';
    const sink = new Writable({
      write(chunk: Buffer, _enc, done) {
        log += chunk.toString();
        done();
      },
    });
    const app = createApp({ ...deps, logger: pino({ level: 'warn' }, sink) });
    const missing = await request(app).get('/api/no-such-route');
    expect(missing.status).toBe(404);
    expect(serverErrorsIn(log)).toEqual([]);

    // A database that went away mid-shift: the sign-in cannot be answered and says so with a 500.
    await deps.db.destroy();
    const broken = await request(app).post('/api/auth/sign-in').set(csrf).send({ email: 'someone@demo.aislewright.test', password: 'wrong-password-1' });
    expect(broken.status).toBe(500);
    const errors = serverErrorsIn(log);
    expect(errors.some((e) => e.includes('/api/auth/sign-in') && e.includes('500'))).toBe(true);
  });
});
