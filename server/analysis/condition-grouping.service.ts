import type { Acquisition } from '../dicom/acquisition.ts';

/** Anything with a label and acquisition facts (an AnalysisImage fits). */
export interface GroupableImage {
  label: string;
  acquisition: Acquisition;
}

/** What makes images one condition: room, beam quality and phantom. */
export interface ConditionKey {
  stationName: string | null;
  kvp: number | null;
  bodyPartThicknessMm: number | null;
}

/** A grid vs no-grid comparison formed from headers, with its replicates. */
export interface FormedCondition<T extends GroupableImage> {
  key: ConditionKey;
  grid: {
    grid: string[];
    gridId: string | null;
    exposureMas: number | null;
    images: T[];
  };
  noGrid: { exposureMas: number | null; images: T[] };
}

/** An image that could not be placed, and why. */
export interface UnassignedImage {
  label: string;
  reason: string;
}

function rounded(value: number | null, step: number): string {
  return value === null ? '–' : String(Math.round(value / step) * step);
}

function keyText(a: Acquisition): string {
  return [
    a.stationName ?? '–',
    rounded(a.kvp, 0.1),
    rounded(a.bodyPartThicknessMm, 0.1),
  ].join('|');
}

/** Whether the Grid attribute says a grid was in the beam (null: unknown). */
export function hasGrid(acquisition: Acquisition): boolean | null {
  const values = acquisition.grid?.map((v) => v.trim().toUpperCase());
  if (!values || values.length === 0) return null;
  return !values.includes('NONE');
}

/**
 * Forms grid/no-grid conditions from image headers. Images with the same
 * Station Name, kV (to 0.1 kV) and Body Part Thickness (to 0.1 mm) belong to
 * one set-up; within it, images with the same Grid attribute value, Grid ID
 * and exposure (to 0.001 mAs) are replicates, and every grid set is paired
 * with every no-grid set (e.g. a same-mAs and an equal-dose grid series
 * against one no-grid series). Images without a Grid attribute, or a set-up
 * with only one side, are returned as unassigned with the reason.
 * @param images labelled images with their acquisition facts.
 * @returns conditions in a stable order (station, kV, thickness, grid mAs)
 *   and the images left out.
 */
export function formConditions<T extends GroupableImage>(
  images: readonly T[],
): { conditions: Array<FormedCondition<T>>; unassigned: UnassignedImage[] } {
  const unassigned: UnassignedImage[] = [];
  const setups = new Map<
    string,
    { grid: Map<string, T[]>; noGrid: Map<string, T[]> }
  >();
  for (const image of images) {
    const gridState = hasGrid(image.acquisition);
    if (gridState === null) {
      unassigned.push({
        label: image.label,
        reason:
          'The file has no Grid attribute (0018,1166), so it is not known whether a grid was used.',
      });
      continue;
    }
    const setupKey = keyText(image.acquisition);
    const setup = setups.get(setupKey) ?? {
      grid: new Map(),
      noGrid: new Map(),
    };
    setups.set(setupKey, setup);
    const a = image.acquisition;
    const sideKey = gridState
      ? [
          a.grid!.join('\\'),
          a.gridId ?? '',
          rounded(a.exposureMas, 0.001),
        ].join('|')
      : rounded(a.exposureMas, 0.001);
    const side = gridState ? setup.grid : setup.noGrid;
    side.set(sideKey, [...(side.get(sideKey) ?? []), image]);
  }
  const conditions: Array<FormedCondition<T>> = [];
  for (const setup of setups.values()) {
    if (setup.grid.size === 0 || setup.noGrid.size === 0) {
      const lonely = [...setup.grid.values(), ...setup.noGrid.values()].flat();
      for (const image of lonely) {
        unassigned.push({
          label: image.label,
          reason: `No ${setup.grid.size === 0 ? 'grid' : 'no-grid'} image shares its station, kV and phantom thickness.`,
        });
      }
      continue;
    }
    for (const gridImages of setup.grid.values()) {
      for (const noGridImages of setup.noGrid.values()) {
        const g = gridImages[0]!.acquisition;
        conditions.push({
          key: {
            stationName: g.stationName,
            kvp: g.kvp,
            bodyPartThicknessMm: g.bodyPartThicknessMm,
          },
          grid: {
            grid: g.grid!,
            gridId: g.gridId,
            exposureMas: g.exposureMas,
            images: gridImages,
          },
          noGrid: {
            exposureMas: noGridImages[0]!.acquisition.exposureMas,
            images: noGridImages,
          },
        });
      }
    }
  }
  const order = (c: FormedCondition<T>): Array<string | number> => [
    c.key.stationName ?? '',
    c.key.kvp ?? 0,
    c.key.bodyPartThicknessMm ?? 0,
    c.grid.exposureMas ?? 0,
    c.noGrid.exposureMas ?? 0,
  ];
  conditions.sort((x, y) => {
    const a = order(x);
    const b = order(y);
    for (let i = 0; i < a.length; i += 1) {
      if (a[i]! < b[i]!) return -1;
      if (a[i]! > b[i]!) return 1;
    }
    return 0;
  });
  return { conditions, unassigned };
}
