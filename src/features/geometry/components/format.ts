/**
 * A number for display with `significant` digits, trailing zeros dropped;
 * an en dash when there is no value.
 */
export function formatNumber(
  value: number | null | undefined,
  significant = 4,
): string {
  if (value === null || value === undefined || !Number.isFinite(value)) {
    return '–';
  }
  return String(Number(value.toPrecision(significant)));
}

/** A fraction as "0.50 (50 %)". */
export const formatFraction = (fraction: number): string =>
  `${fraction.toFixed(2)} (${Math.round(fraction * 100)} %)`;

/** A distance in cm to one decimal, "83.3 cm"; "∞" for no limit. */
export const formatCm = (value: number | null): string =>
  value === null ? '∞' : `${value.toFixed(1)} cm`;

/** Text typed in a number field: empty → undefined, else the number (or NaN). */
export function parseNumberField(text: string): number | undefined {
  const trimmed = text.trim().replace(',', '.');
  return trimmed === '' ? undefined : Number(trimmed);
}
