/**
 * Query keys of the equipment register. Every change invalidates the whole
 * `equipment` family: rooms list their units, detectors and grids, so one
 * change shows up on several pages.
 */
export const equipmentKeys = {
  all: ['equipment'] as const,
  rooms: () => [...equipmentKeys.all, 'rooms'] as const,
  room: (id: number) => [...equipmentKeys.all, 'rooms', id] as const,
  grids: () => [...equipmentKeys.all, 'grids'] as const,
  grid: (id: number) => [...equipmentKeys.all, 'grids', id] as const,
  detector: (id: number) => [...equipmentKeys.all, 'detectors', id] as const,
};
