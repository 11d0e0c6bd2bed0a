import { QueryTypes, type Sequelize } from 'sequelize';
import { sequelize } from '../db/sequelize.ts';
import type { BoardFilters } from './compare-board.service.ts';

// What the board can be filtered by, and its filters in words for reports.

/**
 * Rooms, grids and detectors the board can filter by, by name.
 */
export async function boardOptions(db: Sequelize = sequelize): Promise<{
  rooms: Array<{ id: number; name: string; site: string }>;
  grids: Array<{ id: number; label: string; ratio: number | null }>;
  detectors: Array<{ id: number; name: string; roomId: number }>;
}> {
  const [rooms, grids, detectors] = await Promise.all([
    db.query<{ id: number; name: string; site: string }>(
      'SELECT id, name, site FROM rooms ORDER BY name',
      { type: QueryTypes.SELECT },
    ),
    db.query<{ id: number; label: string; ratio: number | null }>(
      'SELECT id, label, ratio FROM grids ORDER BY label',
      { type: QueryTypes.SELECT },
    ),
    db.query<{ id: number; name: string; roomId: number }>(
      'SELECT id, name, room_id AS "roomId" FROM detectors ORDER BY name',
      { type: QueryTypes.SELECT },
    ),
  ]);
  return { rooms, grids, detectors };
}

/** The board's filters in words, for a report's cover. */
export async function describeBoardFilters(
  filters: BoardFilters,
  db: Sequelize = sequelize,
): Promise<string[]> {
  const names = async (sql: string, ids: number[] | undefined) =>
    ids?.length
      ? (
          await db.query<{ name: string }>(sql, {
            type: QueryTypes.SELECT,
            replacements: { ids },
          })
        ).map((r) => r.name)
      : [];
  const [rooms, grids, detectors] = await Promise.all([
    names(
      'SELECT name FROM rooms WHERE id IN (:ids) ORDER BY name',
      filters.rooms,
    ),
    names(
      'SELECT label AS name FROM grids WHERE id IN (:ids) ORDER BY label',
      filters.grids,
    ),
    names(
      'SELECT name FROM detectors WHERE id IN (:ids) ORDER BY name',
      filters.detectors,
    ),
  ]);
  const range = (label: string, unit: string, min?: number, max?: number) =>
    min === undefined && max === undefined
      ? []
      : [`${label} ${min ?? 'any'}–${max ?? 'any'} ${unit}`];
  return [
    ...(rooms.length ? [`rooms: ${rooms.join(', ')}`] : []),
    ...(grids.length ? [`grids: ${grids.join(', ')}`] : []),
    ...(detectors.length ? [`detectors: ${detectors.join(', ')}`] : []),
    ...range('tube voltage', 'kV', filters.kvMin, filters.kvMax),
    ...range(
      'phantom thickness',
      'cm',
      filters.thicknessMin,
      filters.thicknessMax,
    ),
    ...(filters.from || filters.to
      ? [`studies dated ${filters.from ?? 'any'} to ${filters.to ?? 'any'}`]
      : []),
  ];
}
