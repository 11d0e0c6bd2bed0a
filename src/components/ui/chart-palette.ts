/**
 * Line colours for every chart in Lamella, in the order series take them,
 * so one grid or thickness looks the same from the results to the board.
 */
export const SERIES_COLOURS = [
  '#215553',
  '#b45309',
  '#4338ca',
  '#be123c',
  '#15803d',
  '#7e22ce',
  '#0369a1',
  '#a16207',
] as const;

/** The colour of the i-th series, cycling through the palette. */
export const seriesColour = (index: number): string =>
  SERIES_COLOURS[index % SERIES_COLOURS.length]!;
