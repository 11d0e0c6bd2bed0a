import { Link } from 'react-router-dom';
import type {
  GridDto,
  RoomDto,
} from '../../../../shared/schemas/equipment.schema.ts';
import { formatNumber } from './format.ts';
import { CONSTRUCTION_VALUES, GridValue } from './grid-value.tsx';

/** The grid inventory as a table; each label opens the grid's page. */
export function GridTable({
  grids,
  rooms,
}: {
  grids: GridDto[];
  rooms: RoomDto[];
}) {
  const roomName = (id: number | null) =>
    rooms.find((r) => r.id === id)?.name ?? 'Not kept in one room';
  return (
    <div className="overflow-x-auto rounded-xl bg-white shadow-sm">
      <table className="w-full text-sm">
        <caption className="sr-only">Grid inventory</caption>
        <thead className="bg-lamina-50 text-left text-lamina-900">
          <tr>
            <th className="px-3 py-2">Label</th>
            <th className="px-3 py-2">Room</th>
            {CONSTRUCTION_VALUES.map(({ quantity, column }) => (
              <th key={quantity} className="px-3 py-2">
                {column}
              </th>
            ))}
            <th className="px-3 py-2">f0 (cm)</th>
            <th className="px-3 py-2">Serial</th>
          </tr>
        </thead>
        <tbody>
          {grids.map((grid) => (
            <tr
              key={grid.id}
              className="border-t border-slate-100"
              data-testid={`grid-row-${grid.label}`}
            >
              <td className="px-3 py-2 font-semibold">
                <Link
                  className="text-lamina-700 underline"
                  to={`/equipment/grids/${grid.id}`}
                >
                  {grid.label}
                </Link>
              </td>
              <td className="px-3 py-2">{roomName(grid.roomId)}</td>
              {CONSTRUCTION_VALUES.map(({ quantity }) => (
                <td key={quantity} className="px-3 py-2">
                  <GridValue grid={grid} quantity={quantity} />
                </td>
              ))}
              <td className="px-3 py-2">
                {grid.focusDistanceCm === null
                  ? 'parallel'
                  : formatNumber(grid.focusDistanceCm)}
              </td>
              <td className="px-3 py-2">{grid.serial ?? '–'}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
