/**
 * Colours of the floor map as plain constants: canvas drawing cannot read CSS variables cheaply on
 * every frame, and the map must look the same whatever theme the shell loads. Deep teal for the
 * route, warm amber for what needs the eye (current stop, search hit), neutral slate for the plan.
 * Every state also has a shape or pattern (dash, hatch, ring, label), so colour is never the only cue.
 */
export interface MapPalette {
  background: string;
  /** Walkable floor of aisles and cross aisles. */
  floor: string;
  /** Thin centre line of aisles. */
  centreLine: string;
  rackFill: string;
  rackEdge: string;
  /** Alternate fill so neighbouring levels read apart. */
  binFill: string;
  binFillAlt: string;
  label: string;
  labelHalo: string;
  closureFill: string;
  closureHatch: string;
  closureText: string;
  depotFill: string;
  depotText: string;
  routeRemaining: string;
  routeWalked: string;
  stopFill: string;
  stopText: string;
  stopDoneFill: string;
  stopDoneText: string;
  currentFill: string;
  currentText: string;
  currentRing: string;
  highlight: string;
  hover: string;
  tooltipBg: string;
  tooltipText: string;
  tooltipBorder: string;
}

export const LIGHT_PALETTE: MapPalette = {
  background: '#f4f6f8',
  floor: '#ffffff',
  centreLine: '#cbd5df',
  rackFill: '#7b8794',
  rackEdge: '#52606d',
  binFill: '#9aa5b1',
  binFillAlt: '#b6bfc8',
  label: '#1f2933',
  labelHalo: '#f4f6f8',
  closureFill: '#fde8c8',
  closureHatch: '#8a4b00',
  closureText: '#5c3200',
  depotFill: '#0b4f55',
  depotText: '#ffffff',
  routeRemaining: '#0b6e75',
  routeWalked: '#6b7785',
  stopFill: '#0b4f55',
  stopText: '#ffffff',
  stopDoneFill: '#e4e7eb',
  stopDoneText: '#1f2933',
  currentFill: '#f0a202',
  currentText: '#1f1300',
  currentRing: '#1f2933',
  highlight: '#d97b00',
  hover: '#0b4f55',
  tooltipBg: '#ffffff',
  tooltipText: '#1f2933',
  tooltipBorder: '#52606d',
};

export const DARK_PALETTE: MapPalette = {
  background: '#111820',
  floor: '#1b2530',
  centreLine: '#2e3b48',
  rackFill: '#4f5d6b',
  rackEdge: '#8796a5',
  binFill: '#5d6b79',
  binFillAlt: '#73818f',
  label: '#e8edf2',
  labelHalo: '#111820',
  closureFill: '#3d2a10',
  closureHatch: '#ffb547',
  closureText: '#ffd9a0',
  depotFill: '#5fd0cf',
  depotText: '#06201f',
  routeRemaining: '#4fd1c5',
  routeWalked: '#9aa5b1',
  stopFill: '#5fd0cf',
  stopText: '#06201f',
  stopDoneFill: '#2e3b48',
  stopDoneText: '#e8edf2',
  currentFill: '#ffb547',
  currentText: '#1f1300',
  currentRing: '#ffffff',
  highlight: '#ffb547',
  hover: '#5fd0cf',
  tooltipBg: '#1b2530',
  tooltipText: '#e8edf2',
  tooltipBorder: '#8796a5',
};

export function paletteFor(dark: boolean): MapPalette {
  return dark ? DARK_PALETTE : LIGHT_PALETTE;
}
