import type { FigureValueDto } from '../../../../shared/schemas/compare.schema.ts';

/** Four significant digits, or a dash for no value. */
export function formatNumber(value: number | null | undefined): string {
  if (value === null || value === undefined || !Number.isFinite(value)) {
    return '—';
  }
  return Number(value.toPrecision(4)).toString();
}

/** "1.234 [1.15–1.318]" for a figure with its 95 % interval. */
export const withInterval = (f: FigureValueDto | undefined): string =>
  f
    ? `${formatNumber(f.value)} [${formatNumber(f.ciLow)}–${formatNumber(f.ciHigh)}]`
    : '—';

/** The date part of an ISO timestamp. */
export const day = (iso: string | null): string =>
  iso ? iso.slice(0, 10) : '—';
