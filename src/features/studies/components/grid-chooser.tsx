import type { GridRefDto } from '../../../../shared/studies/study-dto.ts';

interface GridChooserProps {
  grids: GridRefDto[];
  /** The study's room; its grids (and the chosen ones) are listed first. */
  roomId: number | null;
  selected: number[];
  error?: string;
  onToggle: (gridId: number) => void;
}

function GridOption({
  grid,
  isChosen,
  onToggle,
}: {
  grid: GridRefDto;
  isChosen: boolean;
  onToggle: () => void;
}) {
  return (
    <label
      className={`flex cursor-pointer items-center gap-2 rounded-lg px-3 py-1.5 text-sm ring-1 ${
        isChosen ? 'bg-lamina-100 ring-lamina-500' : 'bg-white ring-slate-300'
      }`}
    >
      <input type="checkbox" checked={isChosen} onChange={onToggle} />
      {grid.label}
      {grid.ratio !== null && (
        <span className="text-slate-500">{grid.ratio}:1</span>
      )}
    </label>
  );
}

/** The grids under test: the room's own first, the rest of the inventory folded away. */
export function GridChooser({
  grids,
  roomId,
  selected,
  error,
  onToggle,
}: GridChooserProps) {
  const isNear = (g: GridRefDto) =>
    selected.includes(g.id) || (roomId !== null && g.roomId === roomId);
  const near = grids.filter(isNear);
  const others = grids.filter((g) => !isNear(g));
  const option = (g: GridRefDto) => (
    <GridOption
      key={g.id}
      grid={g}
      isChosen={selected.includes(g.id)}
      onToggle={() => onToggle(g.id)}
    />
  );
  return (
    <fieldset>
      <legend className="text-sm font-semibold text-slate-700">
        Grids under test
      </legend>
      {grids.length === 0 && (
        <p className="text-sm text-slate-500">
          The grid inventory is empty: register a grid first.
        </p>
      )}
      {grids.length > 0 && near.length === 0 && (
        <p className="mt-1 text-sm text-slate-500">
          {roomId === null
            ? 'Choose the room to see its grids.'
            : 'No grid is kept in this room; choose one from the inventory.'}
        </p>
      )}
      <div className="mt-2 flex flex-wrap gap-2">{near.map(option)}</div>
      {others.length > 0 && (
        <details className="mt-2">
          <summary className="cursor-pointer text-sm text-lamina-800">
            Other grids of the inventory ({others.length})
          </summary>
          <div className="mt-2 flex max-h-64 flex-wrap gap-2 overflow-y-auto">
            {others.map(option)}
          </div>
        </details>
      )}
      {error && (
        <p role="alert" className="mt-1 text-xs text-red-700">
          {error}
        </p>
      )}
    </fieldset>
  );
}
