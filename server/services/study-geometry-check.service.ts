import { Op, type Transaction } from 'sequelize';
import {
  focusingRange,
  type FocusingRange,
} from '../../shared/physics/focused-grid.ts';
import type { Arm } from '../../shared/schemas/study.schema.ts';
import type { Warning } from '../../shared/warnings.ts';
import type { Grid } from '../models/grid.model.ts';
import { ImageAssignment } from '../models/image-assignment.model.ts';
import { Image } from '../models/image.model.ts';
import { StudyCondition } from '../models/study-condition.model.ts';
import type { Study } from '../models/study.model.ts';

/**
 * The automatic geometry check of a study: is the focus–grid distance of
 * each grid under test inside its focusing range for the planned field?
 * The distance is the planned SID, and the SID in each grid image's header
 * where it differs; the grid's ratio and focusing distance come from the
 * register, or from the image's Grid Focal Distance (0018,704C) and Grid
 * Aspect Ratio (0018,7046) when the image is not tied to a register grid.
 *
 * Two simplifications, stated in every warning: the SID stands for the
 * focus–grid distance (the grid sits a few cm above the detector, which
 * moves the edge of the range by that much), and the plan's field width is
 * taken as the width across the strips. An upside-down grid cannot be seen
 * from the plan or the headers, so it is not checked.
 *
 * @see PHYSICS.md §5 (focusing-range limits 1/f = 1/f0 ± 0.4/(r·c), the
 *   60 % criterion from memory of IEC 60627); DICOM PS3.3 X-Ray Grid
 *   Description Macro.
 */

/** The register fields the check reads (a Grid row or a GridDto). */
export type GeometryCheckGrid = Pick<
  Grid,
  'id' | 'label' | 'ratio' | 'focusDistanceCm'
>;

/** One image's header facts the check reads, with where it sits. */
export interface GeometryCheckImage {
  id: number;
  originalName: string;
  /** Distance Source to Detector (0018,1110), mm, corrections applied. */
  sidMm: number | null;
  /** Grid Focal Distance (0018,704C), mm. */
  gridFocalDistanceMm: number | null;
  /** Grid Aspect Ratio (0018,7046), e.g. [12, 1]. */
  gridAspectRatio: readonly number[] | null;
  /** The register grid of the condition the image is assigned to. */
  gridId: number | null;
  /** The arm it fills; no-grid images are not checked. */
  arm: Arm | null;
}

const cm = (value: number): string => Number(value.toFixed(1)).toString();

function rangeText(range: FocusingRange): string {
  return `${range.nearCm.toFixed(1)}–${range.farCm === null ? '∞' : range.farCm.toFixed(1)} cm`;
}

function isOutside(range: FocusingRange, distanceCm: number): boolean {
  return (
    distanceCm < range.nearCm ||
    (range.farCm !== null && distanceCm > range.farCm)
  );
}

const ASSUMPTIONS =
  'The SID is taken as the focus–grid distance and the field width as the width across the strips.';

interface CheckedGrid {
  /** "Grid G12 (12:1, focused at 100 cm)" or "The grid in the header …". */
  name: string;
  ratio: number;
  focusDistanceCm: number;
}

function describeGrid(label: string | null, ratio: number, f0Cm: number) {
  const facts = `${Number(ratio.toPrecision(4))}:1, focused at ${cm(f0Cm)} cm`;
  return label === null
    ? `The grid named in the header (${facts})`
    : `Grid ${label} (${facts})`;
}

function outsideWarning(
  grid: CheckedGrid,
  distanceCm: number,
  fieldWidthCm: number,
  where: string,
): Warning | null {
  const range = focusingRange(
    grid.ratio,
    grid.focusDistanceCm,
    fieldWidthCm / 2,
  );
  if (!isOutside(range, distanceCm)) return null;
  return {
    code: 'sid_outside_focusing_range',
    message: `${grid.name}: ${where} is ${cm(distanceCm)} cm, outside its focusing range ${rangeText(range)} for a ${cm(fieldWidthCm)} cm field (edge primary below ${Math.round(range.criterion * 100)} % of its centred value, ${range.criterionSource}). ${ASSUMPTIONS}`,
  };
}

function imageGrid(
  image: GeometryCheckImage,
  grids: readonly GeometryCheckGrid[],
): CheckedGrid | null {
  const register = grids.find((g) => g.id === image.gridId) ?? null;
  const pair = image.gridAspectRatio;
  const headerRatio =
    pair && pair.length === 2 && pair[1]! > 0 ? pair[0]! / pair[1]! : null;
  const headerF0Cm =
    image.gridFocalDistanceMm === null ? null : image.gridFocalDistanceMm / 10;
  const ratio = register?.ratio ?? headerRatio;
  const f0Cm = register?.focusDistanceCm ?? headerF0Cm;
  if (ratio === null || f0Cm === null || !(ratio > 0) || !(f0Cm > 0)) {
    return null;
  }
  return {
    name: describeGrid(register?.label ?? null, ratio, f0Cm),
    ratio,
    focusDistanceCm: f0Cm,
  };
}

function listNames(names: string[]): string {
  const shown = names.slice(0, 3).join(', ');
  return names.length > 3 ? `${shown} and ${names.length - 3} more` : shown;
}

/**
 * Warnings for a study whose geometry falls outside a focused grid's
 * focusing range: one per grid under test for the planned SID, and one per
 * grid and distance for grid images whose header SID is outside while the
 * planned SID is not (the images are named).
 * @param study the study; its plan gives SID (cm) and field width (cm).
 * @param grids grids under test (ratio, focusing distance in cm); those
 *   without both (parallel grids) are not checked.
 * @param images header facts of the study's images (optional).
 * @returns `sid_outside_focusing_range` warnings with the numbers; empty
 *   when everything is inside or nothing can be checked.
 * @see PHYSICS.md §5.
 */
export function studyGeometryWarnings(
  study: Pick<Study, 'plan'>,
  grids: readonly GeometryCheckGrid[],
  images: readonly GeometryCheckImage[] = [],
): Warning[] {
  const { sidCm, fieldWidthCm } = study.plan.geometry;
  const warnings: Warning[] = [];
  for (const grid of grids) {
    if (grid.ratio === null || grid.focusDistanceCm === null) continue;
    const checked: CheckedGrid = {
      name: describeGrid(grid.label, grid.ratio, grid.focusDistanceCm),
      ratio: grid.ratio,
      focusDistanceCm: grid.focusDistanceCm,
    };
    const warning = outsideWarning(
      checked,
      sidCm,
      fieldWidthCm,
      'the planned SID',
    );
    if (warning) warnings.push(warning);
  }
  const byGridAndSid = new Map<
    string,
    { grid: CheckedGrid; sidCm: number; names: string[] }
  >();
  for (const image of images) {
    if (image.arm === 'no_grid' || image.sidMm === null) continue;
    const grid = imageGrid(image, grids);
    if (!grid) continue;
    const imageSidCm = image.sidMm / 10;
    const key = JSON.stringify([grid.name, cm(imageSidCm)]);
    const entry = byGridAndSid.get(key) ?? {
      grid,
      sidCm: imageSidCm,
      names: [],
    };
    entry.names.push(image.originalName);
    byGridAndSid.set(key, entry);
  }
  for (const { grid, sidCm: imageSidCm, names } of byGridAndSid.values()) {
    const sameAsPlan =
      grids.some(
        (g) =>
          g.ratio === grid.ratio && g.focusDistanceCm === grid.focusDistanceCm,
      ) && cm(imageSidCm) === cm(sidCm);
    if (sameAsPlan) continue;
    const warning = outsideWarning(
      grid,
      imageSidCm,
      fieldWidthCm,
      `the SID in the header of ${listNames(names)}`,
    );
    if (warning) warnings.push(warning);
  }
  return warnings;
}

/**
 * Loads the header facts {@link studyGeometryWarnings} reads for every image
 * of a study: SID with the user's correction laid over the file's value,
 * grid attributes, and the grid and arm of the image's assignment.
 * @param studyId the study.
 * @param transaction optional transaction to read in.
 */
export async function loadGeometryCheckImages(
  studyId: number,
  transaction?: Transaction,
): Promise<GeometryCheckImage[]> {
  const images = await Image.findAll({
    where: { studyId },
    attributes: [
      'id',
      'originalName',
      'sidMm',
      'gridFocalDistanceMm',
      'gridAspectRatio',
      'corrections',
    ],
    order: [['id', 'ASC']],
    transaction,
  });
  if (images.length === 0) return [];
  const assignments = await ImageAssignment.findAll({
    where: { studyId, imageId: { [Op.in]: images.map((i) => i.id) } },
    transaction,
  });
  const conditions = await StudyCondition.findAll({
    where: { studyId },
    attributes: ['id', 'gridId'],
    transaction,
  });
  return images.map((image) => {
    const assignment = assignments.find((a) => a.imageId === image.id);
    const condition = assignment
      ? conditions.find((c) => c.id === assignment.conditionId)
      : undefined;
    const corrected = image.corrections;
    return {
      id: image.id,
      originalName: image.originalName,
      sidMm: corrected.sidMm?.value ?? image.sidMm,
      gridFocalDistanceMm:
        corrected.gridFocalDistanceMm?.value ?? image.gridFocalDistanceMm,
      gridAspectRatio:
        corrected.gridAspectRatio?.value ?? image.gridAspectRatio,
      gridId: condition?.gridId ?? null,
      arm: assignment?.arm ?? null,
    };
  });
}
