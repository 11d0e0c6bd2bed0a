import type {
  LayoutDto,
  PlacementDto,
} from '../../shared/schemas/layout.schema.ts';
import type { ImageRegion } from '../models/image-region.model.ts';
import type { RegionLayoutRecord } from '../models/region-layout.model.ts';
import { toRegionLayout } from '../models/region-layout.model.ts';
import type { User } from '../models/user.model.ts';

/**
 * A saved layout. `canEdit` is decided by the caller: the layout policy for
 * a library layout, the study policy (and state) for a study's own.
 */
export function presentLayout(
  layout: RegionLayoutRecord,
  owner: Pick<User, 'id' | 'displayName'> | null,
  permissions: LayoutDto['permissions'],
): LayoutDto {
  return {
    ...toRegionLayout(layout),
    id: layout.id,
    studyId: layout.studyId,
    referenceImageId: layout.referenceImageId,
    owner: owner ? { id: owner.id, displayName: owner.displayName } : null,
    createdAt: layout.createdAt.toISOString(),
    updatedAt: layout.updatedAt.toISOString(),
    permissions,
  };
}

/** Where the layout sits on one image. */
export function presentPlacement(row: ImageRegion): PlacementDto {
  return {
    imageId: row.imageId,
    dxPx: row.dxPx,
    dyPx: row.dyPx,
    confidence: row.shiftConfidence,
    source: row.source,
    overrides: row.overrides,
  };
}
