/** Milliseconds from an arbitrary origin. Injected so core stays free of Node and browser globals. */
export type Clock = () => number;

/** `performance.now()` exists in Node ≥ 16, browsers and workers alike. */
export const defaultClock: Clock = () => globalThis.performance.now();
