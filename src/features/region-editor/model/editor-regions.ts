import type {
  RegionLayout,
  RegionRole,
} from '../../../../shared/analysis/region-layout.ts';
import {
  formatRegionSpec,
  parseRegionSpec,
  regionFromMm,
  type PixelSpacingMm,
  type Region,
} from '../../../../shared/roi/region-geometry.ts';
import { translateRegion } from '../../../../shared/roi/image-shift.ts';

/** A region being edited: always in pixels of the image shown. */
export interface EditorRegion {
  /** Stable identity while editing (names can change). */
  key: string;
  name: string;
  role: RegionRole;
  region: Region;
  /** Backgrounds an object is measured against; empty: all of them. */
  background: string[];
  /** Lead-disc diameter of a beam-stop region, mm. */
  diameterMm?: number;
}

/** The shapes the editor draws. */
export type DrawShape = 'circle' | 'rect' | 'ring';

/** What a pointer grabbed on a region. */
export type Handle = 'move' | 'radius' | 'inner' | 'outer' | 'corner';

let counter = 0;
export const newKey = (): string => `r${(counter += 1)}`;

const round1 = (v: number): number => Math.round(v * 10) / 10;

/** Rounds every coordinate to 0.1 px, as specs are saved. */
export function roundRegion(region: Region): Region {
  switch (region.shape) {
    case 'circle':
      return {
        ...region,
        cx: round1(region.cx),
        cy: round1(region.cy),
        r: round1(region.r),
      };
    case 'ring':
      return {
        ...region,
        cx: round1(region.cx),
        cy: round1(region.cy),
        rInner: round1(region.rInner),
        rOuter: round1(region.rOuter),
      };
    case 'rect':
      return {
        ...region,
        x0: round1(region.x0),
        y0: round1(region.y0),
        w: round1(region.w),
        h: round1(region.h),
      };
    case 'polygon':
      return {
        shape: 'polygon',
        points: region.points.map(([x, y]) => [round1(x), round1(y)]),
      };
  }
}

/**
 * The layout's regions as editor regions in pixels (a layout in mm is
 * converted through the image's pixel spacing).
 * @throws DomainError for a spec that does not parse or mm without spacing.
 */
export function regionsFromLayout(
  layout: Pick<RegionLayout, 'units' | 'regions'>,
  spacing: PixelSpacingMm | null,
): EditorRegion[] {
  return layout.regions.map((r) => {
    const parsed = parseRegionSpec(r.spec);
    const region =
      layout.units === 'mm'
        ? spacing
          ? regionFromMm(parsed, spacing)
          : parsed
        : parsed;
    return {
      key: newKey(),
      name: r.name,
      role: r.role,
      region,
      background: r.background ?? [],
      ...(r.diameterMm !== undefined ? { diameterMm: r.diameterMm } : {}),
    };
  });
}

/** Editor regions as the layout's region list (pixels). */
export function layoutRegions(
  regions: readonly EditorRegion[],
): RegionLayout['regions'] {
  const backgrounds = new Set(
    regions.filter((r) => r.role === 'background').map((r) => r.name),
  );
  return regions.map((r) => {
    const named = r.background.filter((b) => backgrounds.has(b));
    return {
      name: r.name,
      role: r.role,
      spec: formatRegionSpec(roundRegion(r.region)),
      ...(r.role === 'object' && named.length > 0 ? { background: named } : {}),
      ...(r.role === 'beam-stop' ? { diameterMm: r.diameterMm ?? 10 } : {}),
    };
  });
}

/** The first free name "object N" / "background N". */
export function nextName(
  regions: readonly EditorRegion[],
  role: RegionRole,
): string {
  const taken = new Set(regions.map((r) => r.name));
  for (let n = 1; ; n += 1) {
    const name = `${role} ${n}`;
    if (!taken.has(name)) return name;
  }
}

/** The role a newly drawn shape starts with: rings surround, so background. */
export const defaultRole = (shape: DrawShape): RegionRole =>
  shape === 'circle' ? 'object' : 'background';

/** A new region from a drag between two image points. */
export function regionFromDrag(
  shape: DrawShape,
  x0: number,
  y0: number,
  x1: number,
  y1: number,
): Region {
  const distance = Math.hypot(x1 - x0, y1 - y0);
  switch (shape) {
    case 'circle':
      return { shape: 'circle', cx: x0, cy: y0, r: Math.max(0.5, distance) };
    case 'ring':
      return {
        shape: 'ring',
        cx: x0,
        cy: y0,
        rInner: Math.max(0.5, distance * 0.6),
        rOuter: Math.max(1, distance),
      };
    case 'rect':
      return {
        shape: 'rect',
        x0: Math.min(x0, x1),
        y0: Math.min(y0, y1),
        w: Math.max(0.5, Math.abs(x1 - x0)),
        h: Math.max(0.5, Math.abs(y1 - y0)),
      };
  }
}

/** Handle positions of a region, in image pixels. */
export function handlesOf(
  region: Region,
): Array<{ handle: Handle; x: number; y: number }> {
  switch (region.shape) {
    case 'circle':
      return [{ handle: 'radius', x: region.cx + region.r, y: region.cy }];
    case 'ring':
      return [
        { handle: 'inner', x: region.cx + region.rInner, y: region.cy },
        { handle: 'outer', x: region.cx + region.rOuter, y: region.cy },
      ];
    case 'rect':
      return [
        { handle: 'corner', x: region.x0 + region.w, y: region.y0 + region.h },
      ];
    case 'polygon':
      return [];
  }
}

function contains(region: Region, x: number, y: number): boolean {
  switch (region.shape) {
    case 'circle':
      return Math.hypot(x - region.cx, y - region.cy) <= region.r;
    case 'ring': {
      const d = Math.hypot(x - region.cx, y - region.cy);
      return d <= region.rOuter;
    }
    case 'rect':
      return (
        x >= region.x0 &&
        x <= region.x0 + region.w &&
        y >= region.y0 &&
        y <= region.y0 + region.h
      );
    case 'polygon': {
      let inside = false;
      const p = region.points;
      for (let i = 0, j = p.length - 1; i < p.length; j = i, i += 1) {
        const [xi, yi] = p[i]!;
        const [xj, yj] = p[j]!;
        if (yi > y !== yj > y && x < ((xj - xi) * (y - yi)) / (yj - yi) + xi)
          inside = !inside;
      }
      return inside;
    }
  }
}

/**
 * What is under an image point: a handle of the selected region first
 * (within `tolerance` image pixels), then the smallest region containing it.
 */
export function hitTest(
  regions: readonly EditorRegion[],
  selectedKey: string | null,
  x: number,
  y: number,
  tolerance: number,
): { key: string; handle: Handle } | null {
  const ordered = [...regions].sort((a, b) =>
    a.key === selectedKey ? -1 : b.key === selectedKey ? 1 : 0,
  );
  for (const r of ordered) {
    for (const h of handlesOf(r.region)) {
      if (Math.hypot(h.x - x, h.y - y) <= tolerance)
        return { key: r.key, handle: h.handle };
    }
  }
  const containing = regions.filter((r) => contains(r.region, x, y));
  if (containing.length === 0) return null;
  const size = (r: Region) =>
    r.shape === 'circle'
      ? r.r
      : r.shape === 'ring'
        ? r.rOuter
        : r.shape === 'rect'
          ? r.w * r.h
          : 1e9;
  containing.sort((a, b) => size(a.region) - size(b.region));
  return { key: containing[0]!.key, handle: 'move' };
}

/** The region with a handle dragged to (x, y), or moved by (dx, dy). */
export function dragRegion(
  region: Region,
  handle: Handle,
  x: number,
  y: number,
  dx: number,
  dy: number,
): Region {
  if (handle === 'move') return translateRegion(region, dx, dy);
  switch (region.shape) {
    case 'circle':
      return {
        ...region,
        r: Math.max(0.5, Math.hypot(x - region.cx, y - region.cy)),
      };
    case 'ring': {
      const d = Math.hypot(x - region.cx, y - region.cy);
      return handle === 'inner'
        ? { ...region, rInner: Math.min(Math.max(0, d), region.rOuter - 0.5) }
        : { ...region, rOuter: Math.max(region.rInner + 0.5, d) };
    }
    case 'rect':
      return {
        ...region,
        w: Math.max(0.5, x - region.x0),
        h: Math.max(0.5, y - region.y0),
      };
    case 'polygon':
      return region;
  }
}
