/** The part of autocannon 8's API the load test uses (the package ships no types). */
declare module 'autocannon' {
  import type { EventEmitter } from 'node:events';

  export interface Request {
    method?: string;
    path?: string;
    headers?: Record<string, string>;
    body?: string;
    setupRequest?: (req: Request, context: Record<string, unknown>) => Request;
  }
  export interface Client extends EventEmitter {
    setRequests(requests: Request[]): void;
  }
  export interface Options {
    url: string;
    connections?: number;
    connectionRate?: number;
    duration?: number;
    timeout?: number;
    requests?: Request[];
    setupClient?: (client: Client) => void;
  }
  export interface Histogram {
    average: number;
    p50: number;
    p90: number;
    p97_5: number;
    p99: number;
    max: number;
  }
  export interface Result {
    requests: { total: number; average: number };
    latency: Histogram;
    errors: number;
    timeouts: number;
    non2xx: number;
    '2xx': number;
    duration: number;
  }
  export interface Instance extends EventEmitter {
    stop(): void;
  }
  function autocannon(opts: Options, cb: (err: Error | null, result: Result) => void): Instance;
  export default autocannon;
}
