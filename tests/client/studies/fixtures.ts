/** Study rows and plans for the screen tests: only the figures a test gives are set. */
import type { RoutingRow, StudyTrip, StudyVariant } from '../../../shared/studies';

export const routingRow = (key: RoutingRow['key'], metres: number | null, hoursPerDay: number | null = null): RoutingRow => ({
  key,
  label: key,
  applicable: metres !== null,
  reason: metres === null ? 'does not apply' : null,
  metres,
  metresPerTrip: null,
  metresPerLine: null,
  aboveBestPct: null,
  aboveBoundPct: null,
  hours: null,
  hoursPerDay,
  ms: 1,
  solved: null,
});

/** The plan as it is, on 4 aisles and one block, with the given rows and trips. */
export const variantOf = (routing: RoutingRow[], trips: StudyTrip[], lowerBound: number, lines: number): StudyVariant => ({
  key: 'base',
  label: 'Plan as it is',
  changes: [],
  layoutId: null,
  layout: { aisles: 4, crossAisles: 2, bins: 10, blocks: 1, policyNote: null },
  depotNode: 0,
  routing,
  batching: [],
  unplaced: [],
  lowerBound,
  lines,
  trips,
});
