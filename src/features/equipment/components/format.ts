import {
  materialInfo,
  type MaterialId,
} from '../../../../shared/physics/attenuation.ts';

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

/** A grid ratio as the trade writes it, "12:1". */
export const formatRatio = (ratio: number | null): string =>
  ratio === null ? '–' : `${formatNumber(ratio, 3)}:1`;

export const materialName = (id: MaterialId | null): string =>
  id === null ? '–' : materialInfo(id).name;

/** Text typed in a number field: empty → null, else the number (or NaN). */
export function parseNumberField(text: string): number | null {
  const trimmed = text.trim().replace(',', '.');
  return trimmed === '' ? null : Number(trimmed);
}
