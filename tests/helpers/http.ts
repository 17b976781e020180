/** Reading answers the way a browser does: a binary download as a Buffer, the session cookie, a server-sent event stream. */
import http from 'node:http';
import type { Response } from 'supertest';
import { SESSION_COOKIE } from '../../server/http/session';

/** Supertest's parser for a binary answer (a workbook, a zip, a backup): `.buffer(true).parse(binaryBody)` gives a Buffer in `res.body`. */
export function binaryBody(res: import('superagent').Response, cb: (err: Error | null, body: Buffer) => void): void {
  const stream = res as unknown as NodeJS.ReadableStream;
  const chunks: Buffer[] = [];
  stream.on('data', (c: Buffer) => chunks.push(c));
  stream.on('end', () => cb(null, Buffer.concat(chunks)));
}

/** The `name=value` of the session cookie a sign-in answer sets. */
export function sessionCookie(res: Response): string {
  return (res.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith(SESSION_COOKIE))!.split(';')[0]!;
}

export interface EventStreamRead<T> {
  events: T[];
  contentType: string | undefined;
}

/**
 * Opens a server-sent event stream on 127.0.0.1:`port` with the session `cookie` and reads the events named
 * `event`, each one's data parsed by `parse`. After each, `onEvent(events)` says whether enough have come
 * (it may start the next action; a rejection it hands to `fail` ends the read with that error). The stream
 * is closed when done, on an error, or after `timeoutMs`.
 */
export function readEventStream<T>(opts: {
  port: number;
  path: string;
  cookie: string;
  event: string;
  parse: (data: unknown) => T;
  timeoutMs: number;
  onEvent: (events: T[], fail: (e: unknown) => void) => boolean;
}): Promise<EventStreamRead<T>> {
  const read: EventStreamRead<T> = { events: [], contentType: undefined };
  let timer: NodeJS.Timeout | undefined;
  const req = http.get({ host: '127.0.0.1', port: opts.port, path: opts.path, headers: { cookie: opts.cookie, accept: 'text/event-stream' } });
  const done = new Promise<EventStreamRead<T>>((resolve, reject) => {
    req.on('response', (res) => {
      read.contentType = res.headers['content-type'];
      let buf = '';
      res.on('data', (chunk: Buffer) => {
        buf += chunk.toString('utf8');
        let i;
        while ((i = buf.indexOf('\n\n')) >= 0) {
          const block = buf.slice(0, i);
          buf = buf.slice(i + 2);
          const data = block.split('\n').find((l) => l.startsWith('data: '));
          if (!block.split('\n').includes(`event: ${opts.event}`) || !data) continue;
          read.events.push(opts.parse(JSON.parse(data.slice(6))));
          if (opts.onEvent(read.events, reject)) resolve(read);
        }
      });
    });
    req.on('error', reject);
    timer = setTimeout(() => reject(new Error(`not enough ${opts.event} events in ${opts.timeoutMs} ms (got ${read.events.length})`)), opts.timeoutMs);
  });
  return done.finally(() => {
    clearTimeout(timer);
    req.destroy();
  });
}
