import { mkdir, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { DomainError } from '../../shared/errors.ts';
import { writeDicom } from '../dicom/write-dicom.ts';
import type { PhantomSpec } from './phantom-image.ts';
import { phantomTruth, renderPhantomImage } from './phantom-image.ts';

/** One exposure of a synthetic session. */
export interface PhantomExposure {
  /** File name inside the session folder, e.g. "grid-1.dcm". */
  fileName: string;
  spec: PhantomSpec;
  /** Extra or overriding DICOM attributes, by keyword. */
  attributes?: Record<string, string | number | number[] | string[]>;
}

/** A synthetic QC session: one room, one beam quality, one phantom. */
export interface PhantomSessionPlan {
  stationName: string;
  kvp: number;
  bodyPartThicknessMm: number;
  sidMm: number;
  /** Grid attribute value for exposures with a grid; NONE is written otherwise. */
  gridType?: string;
  gridId?: string;
  gridFocalDistanceMm?: number;
  /** Grid Aspect Ratio pair, e.g. [12, 1]. */
  gridAspectRatio?: [number, number];
  /** Target exposure index written beside EI and DI; default 400. */
  targetExposureIndex?: number;
  /** Dose–area product per mAs in dGy·cm² (invented tube output). */
  dapDgyCm2PerMas?: number;
  /** Entrance dose per mAs in mGy (invented tube output). */
  entranceDoseMgyPerMas?: number;
  /** ISO date of the session, e.g. "2025-03-14". */
  date?: string;
  exposures: PhantomExposure[];
}

const DEFAULT_TARGET_EI = 400;

/** DS values: at most 16 characters, so round to significant digits. */
function ds(value: number): number {
  return Number(value.toPrecision(10));
}

/**
 * The DICOM attributes of one synthetic exposure: KVP, ExposureInuAs and
 * Exposure, Grid (the plan's type or NONE), ImagerPixelSpacing, FOR
 * PROCESSING, StationName, BodyPartThickness, Pixel Intensity Relationship
 * (LOG for a logarithmic response, else LIN), EI = 100 × detector air kerma
 * in µGy (IEC 62494-1) with its target and DI, DAP and entrance dose.
 */
export function phantomAttributes(
  plan: PhantomSessionPlan,
  exposure: PhantomExposure,
  index: number,
): Record<string, string | number | number[] | string[]> {
  const spec = exposure.spec;
  const truth = phantomTruth(spec);
  const target = plan.targetExposureIndex ?? DEFAULT_TARGET_EI;
  const ei = 100 * truth.totalUgy;
  const date = (plan.date ?? '2025-03-14').replaceAll('-', '');
  const withGrid = spec.grid !== null;
  const attributes: Record<string, string | number | number[] | string[]> = {
    KVP: plan.kvp,
    ExposureInuAs: Math.round(spec.exposureMas * 1000),
    Exposure: Math.round(spec.exposureMas),
    Grid: withGrid ? (plan.gridType ?? 'FOCUSED') : 'NONE',
    ImagerPixelSpacing: [spec.pixelSpacingMm, spec.pixelSpacingMm],
    StationName: plan.stationName,
    BodyPartThickness: plan.bodyPartThicknessMm,
    BodyPartExamined: 'PHANTOM',
    DistanceSourceToDetector: plan.sidMm,
    PixelIntensityRelationship:
      spec.response.model === 'logarithmic' ? 'LOG' : 'LIN',
    BitsStored: spec.bitsStored ?? 16,
    ExposureIndex: ds(ei),
    TargetExposureIndex: target,
    DeviationIndex: ds(10 * Math.log10(ei / target)),
    SeriesDescription: withGrid ? 'Phantom with grid' : 'Phantom without grid',
    SeriesNumber: withGrid ? 2 : 1,
    InstanceNumber: index + 1,
    AcquisitionDate: date,
    AcquisitionTime: `${String(9 + Math.floor(index / 60)).padStart(2, '0')}${String(index % 60).padStart(2, '0')}00`,
  };
  if (plan.dapDgyCm2PerMas !== undefined) {
    attributes.ImageAndFluoroscopyAreaDoseProduct = ds(
      plan.dapDgyCm2PerMas * spec.exposureMas,
    );
  }
  if (plan.entranceDoseMgyPerMas !== undefined) {
    attributes.EntranceDoseInmGy = ds(
      plan.entranceDoseMgyPerMas * spec.exposureMas,
    );
  }
  if (withGrid && plan.gridId) attributes.GridID = plan.gridId;
  if (withGrid && plan.gridFocalDistanceMm) {
    attributes.GridFocalDistance = plan.gridFocalDistanceMm;
  }
  if (withGrid && plan.gridAspectRatio) {
    attributes.GridAspectRatio = plan.gridAspectRatio;
  }
  return { ...attributes, ...exposure.attributes };
}

/**
 * Renders every exposure of a plan and writes it as a DICOM file (DX For
 * Processing, explicit VR little endian) into `dir`, which is created.
 * Deterministic: the same plan gives byte-identical files.
 * @param dir folder to write into.
 * @param plan the session (all names invented).
 * @returns the written file paths, in plan order.
 * @throws DomainError('validation_failed') for duplicate file names or an
 *   impossible phantom spec.
 */
export async function writePhantomSession(
  dir: string,
  plan: PhantomSessionPlan,
): Promise<string[]> {
  const names = new Set(plan.exposures.map((e) => e.fileName));
  if (names.size !== plan.exposures.length) {
    throw new DomainError(
      'validation_failed',
      'Every exposure of a phantom session needs its own file name.',
    );
  }
  await mkdir(dir, { recursive: true });
  const paths: string[] = [];
  for (const [index, exposure] of plan.exposures.entries()) {
    const pixels = renderPhantomImage(exposure.spec);
    const bytes = writeDicom({
      rows: exposure.spec.rows,
      columns: exposure.spec.columns,
      pixels,
      attributes: phantomAttributes(plan, exposure, index),
    });
    const file = path.join(dir, exposure.fileName);
    await writeFile(file, bytes);
    paths.push(file);
  }
  return paths;
}
