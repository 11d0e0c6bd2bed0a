import type { GridDto } from '../../../../shared/schemas/equipment.schema.ts';
import { DerivedMark } from './derived-mark.tsx';
import { formatNumber, formatRatio } from './format.ts';

type Quantity = GridDto['derivedFields'][number];

/** One construction value of a grid, marked when it was derived. */
export function GridValue({
  grid,
  quantity,
}: {
  grid: GridDto;
  quantity: Quantity;
}) {
  const value = grid[quantity];
  return (
    <span data-testid={`grid-${grid.id}-${quantity}`}>
      {quantity === 'ratio' ? formatRatio(value) : formatNumber(value)}
      {value !== null && grid.derivedFields.includes(quantity) && (
        <DerivedMark />
      )}
    </span>
  );
}
