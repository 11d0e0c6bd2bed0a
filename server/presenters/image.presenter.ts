import { transferSyntaxName } from '../../shared/dicom/transfer-syntaxes.ts';
import type { Actor } from '../../shared/permissions.ts';
import type {
  ImageDetailDto,
  ImageDto,
} from '../../shared/schemas/image.schema.ts';
import {
  effectiveAcquisition,
  fileAcquisition,
  type Image,
} from '../models/image.model.ts';
import { imagePermissions, type ImageFacts } from '../policies/image.policy.ts';

function pixelSpacingOf(image: Image): ImageDto['pixelSpacing'] {
  if (image.spacingRowMm === null || image.spacingColumnMm === null) {
    return null;
  }
  return {
    rowMm: image.spacingRowMm,
    columnMm: image.spacingColumnMm,
    source: image.spacingSource ?? 'unknown',
  };
}

/** The fields of an image the client may see, with its permissions. */
export function presentImage(
  image: Image,
  viewer: Actor,
  facts: ImageFacts,
): ImageDto {
  const base = `/api/images/${image.id}`;
  return {
    id: image.id,
    studyId: image.studyId,
    originalName: image.originalName,
    sha256: image.sha256,
    sizeBytes: image.sizeBytes,
    sopInstanceUid: image.sopInstanceUid,
    uploadedBy: image.uploadedBy,
    createdAt: image.createdAt.toISOString(),
    rows: image.rows,
    columns: image.columns,
    frames: image.frames,
    transferSyntaxUid: image.transferSyntaxUid,
    transferSyntaxName: transferSyntaxName(image.transferSyntaxUid),
    photometricInterpretation: image.photometricInterpretation,
    bitsAllocated: image.bitsAllocated,
    bitsStored: image.bitsStored,
    pixelRepresentation: image.pixelRepresentation,
    samplesPerPixel: image.samplesPerPixel,
    rescaleSlope: image.rescaleSlope,
    rescaleIntercept: image.rescaleIntercept,
    pixelSpacing: pixelSpacingOf(image),
    acquisition: fileAcquisition(image),
    corrections: image.corrections,
    effectiveAcquisition: effectiveAcquisition(image),
    warnings: image.warnings,
    urls: {
      thumbnail: `${base}/preview?size=thumb`,
      preview: `${base}/preview?size=view`,
      pixels: `${base}/pixels`,
    },
    permissions: imagePermissions(viewer, facts),
  };
}

/** {@link presentImage} plus the header (no bulk or patient data). */
export function presentImageDetail(
  image: Image,
  viewer: Actor,
  facts: ImageFacts,
): ImageDetailDto {
  return { ...presentImage(image, viewer, facts), header: image.header };
}
