import type { Request, Response } from 'express';
import { AppError } from './errors';

/** An open server-sent-event stream (the HTML Living Standard's `text/event-stream`). */
export interface EventStream {
  /** Writes one event: `event: <name>` and its data as one JSON line. */
  send(event: string, data: unknown): void;
  /** Ends the response (the browser's EventSource would reconnect unless told otherwise by the data). */
  end(): void;
  /** Runs `fn` once the client goes away (tab closed, network lost, stream ended). */
  onClose(fn: () => void): void;
}

/**
 * Refuses (400 `event_stream_only`) a request that does not accept an event stream, before anything
 * is written: endless streams are only for EventSource clients (they always send this Accept).
 */
export function requireEventStream(req: Request): void {
  if (!(req.get('accept') ?? '').includes('text/event-stream')) {
    throw new AppError('validation', 'event_stream_only', 'Open this with an EventSource (Accept: text/event-stream)', [
      { field: 'Accept', message: 'must accept text/event-stream' },
    ]);
  }
}

/**
 * Starts an event stream on `res`: the headers (never cached, never buffered by a proxy), then
 * `retry:` when given, which tells the browser's EventSource after how long to reconnect.
 */
export function openEventStream(req: Request, res: Response, options: { retryMs?: number } = {}): EventStream {
  res.writeHead(200, { 'Content-Type': 'text/event-stream', 'Cache-Control': 'no-store', Connection: 'keep-alive', 'X-Accel-Buffering': 'no' });
  if (options.retryMs !== undefined) res.write(`retry: ${options.retryMs}\n\n`);
  return {
    send: (event, data) => void res.write(`event: ${event}\ndata: ${JSON.stringify(data)}\n\n`),
    end: () => void res.end(),
    onClose: (fn) => void req.on('close', fn),
  };
}
