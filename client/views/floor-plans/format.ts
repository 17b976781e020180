/** Plain formatting helpers for the floor-plan views; free of Vue so they unit-test on their own. */
import type { JobPhase } from '@shared/floor-plans';
import { count as countNoun, formatMetres } from '@client/utils/format';

/** A number, or with a noun its count in the right number: `count(1, 'bin')` → "1 bin". */
export const count = (n: number, noun?: string, plural?: string): string => (noun ? countNoun(n, noun, plural) : n.toLocaleString('en-GB'));

/** Metres with one decimal when the value has a fraction, e.g. `3,600 m`, `12.5 m`. */
export const metres = (m: number): string => formatMetres(m, { digits: 'auto', space: ' ' });

export function kibibytes(bytes: number): string {
  return bytes < 1024 * 1024 ? `${(bytes / 1024).toFixed(0)} KiB` : `${(bytes / 1024 / 1024).toFixed(1)} MiB`;
}

/** The steps of a build, in order, as the progress list shows them. */
export const BUILD_STEPS: { phases: JobPhase[]; title: string }[] = [
  { phases: ['parsing'], title: 'Read' },
  { phases: ['checking'], title: 'Check rows' },
  { phases: ['building_graph'], title: 'Walk graph' },
  { phases: ['building_distances'], title: 'Distances' },
  { phases: ['saving'], title: 'Save draft' },
];

/** 1-based step of a phase for NSteps; 0 before the first, steps + 1 once done. */
export function stepOf(phase: JobPhase, steps = BUILD_STEPS): number {
  if (phase === 'queued') return 0;
  if (phase === 'done') return steps.length + 1;
  return steps.findIndex((s) => s.phases.includes(phase)) + 1;
}
