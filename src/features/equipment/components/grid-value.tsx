import type { GridDto } from '../../../../shared/schemas/equipment.schema.ts';
import { DerivedMark } from './derived-mark.tsx';
import { formatNumber, formatRatio } from './format.ts';

type Quantity = GridDto['derivedFields'][number];

/** The construction values shown for a grid, with their long and short labels. */
export const CONSTRUCTION_VALUES: readonly {
  quantity: Quantity;
  term: string;
  column: string;
}[] = [
  { quantity: 'ratio', term: 'Grid ratio r', column: 'Ratio' },
  {
    quantity: 'stripFrequencyPerCm',
    term: 'Strip frequency N (lines/cm)',
    column: 'N (lines/cm)',
  },
  { quantity: 'stripHeightUm', term: 'Strip height h (µm)', column: 'h (µm)' },
  {
    quantity: 'interspaceWidthUm',
    term: 'Interspace width D (µm)',
    column: 'D (µm)',
  },
  {
    quantity: 'stripThicknessUm',
    term: 'Strip thickness t (µm)',
    column: 't (µm)',
  },
];

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
