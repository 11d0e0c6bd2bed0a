import { useMemo } from 'react';
import { poolRegionSignals } from '../../../../shared/analysis/layout-measurement.ts';
import { DomainError } from '../../../../shared/errors.ts';
import {
  regionStatistics,
  type RegionStatistics,
} from '../../../../shared/roi/region-statistics.ts';
import type { Warning } from '../../../../shared/warnings.ts';
import type { EditorRegion } from '../model/editor-regions.ts';
import type { PixelImage } from '../model/windowing.ts';

/** Statistics of one region, or why there are none. */
export interface RegionStatsView {
  stats: RegionStatistics | null;
  warnings: Warning[];
  error: string | null;
}

/** An object against its backgrounds, in stored values (not linearised). */
export interface ObjectFiguresView {
  /** (S_bg − S_obj)/S_bg. */
  contrast: number;
  /** (S_bg − S_obj)/σ_bg. */
  cnr: number;
  against: string[];
}

/**
 * Statistics of every region over the full-resolution pixels, recomputed
 * whenever a region changes (while it is dragged, too): the same
 * `regionStatistics` the server uses, so the numbers agree.
 */
export function useRegionStats(
  image: PixelImage | undefined,
  regions: readonly EditorRegion[],
): {
  byKey: Map<string, RegionStatsView>;
  objects: Map<string, ObjectFiguresView>;
} {
  return useMemo(() => {
    const byKey = new Map<string, RegionStatsView>();
    const objects = new Map<string, ObjectFiguresView>();
    if (!image) return { byKey, objects };
    for (const r of regions) {
      try {
        const { stats, warnings } = regionStatistics(
          image.pixels,
          image.columns,
          image.rows,
          r.region,
        );
        byKey.set(r.key, { stats, warnings, error: null });
      } catch (error) {
        if (!(error instanceof DomainError)) throw error;
        byKey.set(r.key, { stats: null, warnings: [], error: error.message });
      }
    }
    const backgrounds = regions.filter((r) => r.role === 'background');
    for (const o of regions.filter((r) => r.role === 'object')) {
      const named = backgrounds.filter((b) => o.background.includes(b.name));
      const used = named.length > 0 ? named : backgrounds;
      const objectStats = byKey.get(o.key)?.stats;
      const parts = used
        .map((b) => byKey.get(b.key)?.stats)
        .filter((s): s is RegionStatistics => !!s);
      if (!objectStats || parts.length === 0 || parts.length !== used.length)
        continue;
      const bg = poolRegionSignals(parts);
      if (!(bg.mean !== 0 && bg.sampleSd > 0)) continue;
      objects.set(o.key, {
        contrast: (bg.mean - objectStats.mean) / bg.mean,
        cnr: (bg.mean - objectStats.mean) / bg.sampleSd,
        against: used.map((b) => b.name),
      });
    }
    return { byKey, objects };
  }, [image, regions]);
}
