/** Four significant digits, without trailing noise for round values. */
export function formatFigure(value: number): string {
  if (value === 0) return '0';
  const magnitude = Math.abs(value);
  return magnitude >= 1e5 || magnitude < 1e-3
    ? value.toExponential(3)
    : String(Number(value.toPrecision(4)));
}

/** A 95 % interval as "low – high". */
export const formatInterval = (low: number, high: number): string =>
  `${formatFigure(low)} – ${formatFigure(high)}`;
