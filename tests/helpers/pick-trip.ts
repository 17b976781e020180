/** A picker's trip as the tablet receives it, for the client's pure tests: three open stops, one wave, one site. */
import type { PickStop, PickTrip } from '@shared/picking';

type PickLine = PickStop['lines'][number];

/** One open line of order WEB-1 in `bin`. */
export function pickLine(id: number, bin: string, over: Partial<PickLine> = {}): PickLine {
  return {
    id,
    orderRef: 'WEB-1',
    sku: `SKU-${id}`,
    description: 'Brass hinge',
    bin,
    qty: 1,
    tote: 1,
    status: 'open',
    pickedQty: null,
    shortReason: null,
    ...over,
  };
}

/** An open stop `n` at (0, y) holding `lines`, its bins taken from them. */
export function pickStop(n: number, y: number, lines: PickLine[], over: Partial<PickStop> = {}): PickStop {
  return { id: n, n, x: 0, y, bins: [...new Set(lines.map((l) => l.bin))], status: 'open', skipped: false, cutOff: false, lines, ...over };
}

/** Trip 9 of picker Pat, being picked, on stop 1, with `stopList`; `lines` counts the stops' lines. */
export function pickTrip(stopList: PickStop[], over: Partial<PickTrip> = {}): PickTrip {
  return {
    id: 9,
    n: 1,
    status: 'picking',
    pickerId: 4,
    pickerName: 'Pat',
    orders: ['WEB-1'],
    stops: stopList.length,
    lines: stopList.reduce((n, s) => n + s.lines.length, 0),
    plannedMetres: 100,
    lowerBoundMetres: 95,
    estMinutes: 5,
    totes: 1,
    kg: 1,
    litres: 1,
    waveId: 1,
    waveName: 'W',
    planId: 1,
    siteName: 'S',
    siteId: 1,
    path: [],
    depot: [0, 0],
    depotCode: 'D1',
    confirmScan: 'bin',
    startedAt: null,
    finishedAt: null,
    cartReadyAt: null,
    currentStopId: 1,
    revision: 3,
    routeChangedAt: null,
    stopList,
    ...over,
  };
}
