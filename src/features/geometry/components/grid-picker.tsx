import type { GridDto } from '../../../../shared/schemas/equipment.schema.ts';
import { SelectField } from '../../../components/ui/field.tsx';
import { useRegisterGrids } from '../api/register-grids.ts';
import { formatNumber } from './format.ts';

/** "Typed values" or one register grid, by id. */
export type GridChoice = number | 'typed';

function describeGrid(grid: GridDto): string {
  const ratio =
    grid.ratio === null ? '' : ` · ${formatNumber(grid.ratio, 3)}:1`;
  const focus =
    grid.focusDistanceCm === null
      ? ''
      : ` · f0 ${formatNumber(grid.focusDistanceCm)} cm`;
  return `${grid.label}${ratio}${focus}`;
}

/**
 * Chooses typed values or a grid from the register; the register's grids
 * load in the background and the choice of typed values always works.
 */
export function GridPicker({
  value,
  onChange,
  error,
  isUsable = () => true,
}: {
  value: GridChoice;
  onChange: (choice: GridChoice, grid: GridDto | null) => void;
  error?: string;
  /** Grids that cannot serve here are listed but disabled. */
  isUsable?: (grid: GridDto) => boolean;
}) {
  const grids = useRegisterGrids();
  const list = grids.data ?? [];
  return (
    <SelectField
      label="Grid"
      value={String(value)}
      error={
        error ??
        (grids.isError ? 'The register could not be loaded.' : undefined)
      }
      onChange={(event) => {
        const choice =
          event.target.value === 'typed' ? 'typed' : Number(event.target.value);
        onChange(choice, list.find((g) => g.id === choice) ?? null);
      }}
    >
      <option value="typed">Typed values</option>
      {grids.isPending && <option disabled>Loading the register…</option>}
      {list.map((grid) => (
        <option key={grid.id} value={grid.id} disabled={!isUsable(grid)}>
          {describeGrid(grid)}
        </option>
      ))}
    </SelectField>
  );
}
