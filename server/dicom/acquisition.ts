import type { DataSet } from 'dicom-parser';
import type {
  AcquisitionDto,
  SpacingMmDto,
} from '../../shared/schemas/image.schema.ts';
import type { Warning } from '../../shared/warnings.ts';
import { numericValues, stringValue, stringValues } from './dicom-values.ts';

/**
 * Acquisition facts of a projection radiograph (PHYSICS.md §9) as the file
 * gives them: the fields the client sees, plus the file's identifiers.
 */
export interface Acquisition extends AcquisitionDto {
  /** Which attribute gave exposureMas: µAs (0018,1153), mAs (0018,1152) or current × time. */
  exposureMasSource: 'ExposureInuAs' | 'Exposure' | 'CurrentTime' | null;
  sopInstanceUid: string | null;
  sopClassUid: string | null;
  studyInstanceUid: string | null;
  seriesInstanceUid: string | null;
}

/** ISO 8601 text from DICOM DA (YYYYMMDD) and TM (HHMMSS.FFFFFF) values. */
function isoDateTime(date: string | null, time: string | null): string | null {
  if (!date || !/^\d{8}$/.test(date)) return null;
  const day = `${date.slice(0, 4)}-${date.slice(4, 6)}-${date.slice(6, 8)}`;
  if (!time) return day;
  const m = /^(\d{2})(\d{2})?(\d{2})?(\.\d{1,6})?$/.exec(
    time.replace(/:/g, ''),
  );
  if (!m) return day;
  return `${day}T${m[1]}:${m[2] ?? '00'}:${m[3] ?? '00'}${m[4] ?? ''}`;
}

/** ISO 8601 from a DICOM DT value (YYYYMMDDHHMMSS.FFFFFF&ZZXX). */
function isoFromDt(dt: string | null): string | null {
  if (!dt) return null;
  const m = /^(\d{8})(\d{2,6}(?:\.\d{1,6})?)?([+-]\d{4})?$/.exec(dt);
  if (!m) return null;
  const base = isoDateTime(m[1]!, m[2] ?? null);
  if (!base || !m[3]) return base;
  return `${base}${m[3].slice(0, 3)}:${m[3].slice(3)}`;
}

/**
 * Reads the acquisition attributes of PHYSICS.md §9 from a dataset. Values
 * that do not parse become null, with a warning naming the attribute.
 */
export function readAcquisition(ds: DataSet): {
  acquisition: Acquisition;
  warnings: Warning[];
} {
  const warnings: Warning[] = [];
  const numbers = (tag: string, keyword: string): number[] | null => {
    const { values, invalid } = numericValues(ds, tag);
    if (invalid !== null) {
      warnings.push({
        code: 'invalid_attribute_value',
        message: `${keyword} holds '${invalid}', which is not a number; it was ignored.`,
      });
      return null;
    }
    return values.length > 0 ? values : null;
  };
  const number = (tag: string, keyword: string): number | null =>
    numbers(tag, keyword)?.[0] ?? null;
  const strings = (tag: string): string[] | null => {
    const values = stringValues(ds, tag).filter((v) => v !== '');
    return values.length > 0 ? values : null;
  };
  const spacing = (tag: string, keyword: string): SpacingMmDto | null => {
    const values = numbers(tag, keyword);
    if (!values) return null;
    const [rowMm, columnMm] = values;
    if (values.length !== 2 || !(rowMm! > 0) || !(columnMm! > 0)) {
      warnings.push({
        code: 'invalid_attribute_value',
        message: `${keyword} should hold two positive spacings in mm; it was ignored.`,
      });
      return null;
    }
    return { rowMm: rowMm!, columnMm: columnMm! };
  };

  const exposureInuAs = number('x00181153', 'ExposureInuAs');
  const exposure = number('x00181152', 'Exposure');
  const currentInuA = number('x00188151', 'XRayTubeCurrentInuA');
  const current = number('x00181151', 'XRayTubeCurrent');
  const timeInuS = number('x00188150', 'ExposureTimeInuS');
  const time = number('x00181150', 'ExposureTime');
  const tubeCurrentMa = currentInuA !== null ? currentInuA / 1000 : current;
  const exposureTimeMs = timeInuS !== null ? timeInuS / 1000 : time;
  let exposureMas: number | null = null;
  let exposureMasSource: Acquisition['exposureMasSource'] = null;
  if (exposureInuAs !== null) {
    exposureMas = exposureInuAs / 1000;
    exposureMasSource = 'ExposureInuAs';
  } else if (exposure !== null) {
    exposureMas = exposure;
    exposureMasSource = 'Exposure';
  } else if (tubeCurrentMa !== null && exposureTimeMs !== null) {
    exposureMas = (tubeCurrentMa * exposureTimeMs) / 1000;
    exposureMasSource = 'CurrentTime';
  }
  const aspect = numbers('x00187046', 'GridAspectRatio');

  const acquisition: Acquisition = {
    kvp: number('x00180060', 'KVP'),
    exposureMas,
    exposureMasSource,
    tubeCurrentMa,
    exposureTimeMs,
    sidMm: number('x00181110', 'DistanceSourceToDetector'),
    sourceToPatientMm: number('x00181111', 'DistanceSourceToPatient'),
    dapDgyCm2: number('x0018115e', 'ImageAndFluoroscopyAreaDoseProduct'),
    entranceDoseMgy: number('x00408302', 'EntranceDoseInmGy'),
    filterMaterial: strings('x00187050'),
    filterThicknessMinMm: numbers('x00187052', 'FilterThicknessMinimum'),
    filterThicknessMaxMm: numbers('x00187054', 'FilterThicknessMaximum'),
    grid: strings('x00181166'),
    gridAbsorbingMaterial: stringValue(ds, 'x00187040'),
    gridSpacingMaterial: stringValue(ds, 'x00187041'),
    gridThicknessMm: number('x00187042', 'GridThickness'),
    gridPitchMm: number('x00187044', 'GridPitch'),
    gridAspectRatio:
      aspect && aspect.length === 2 ? [aspect[0]!, aspect[1]!] : null,
    gridPeriodMs: number('x00187048', 'GridPeriod'),
    gridFocalDistanceMm: number('x0018704c', 'GridFocalDistance'),
    gridId: stringValue(ds, 'x00181006'),
    exposureIndex: number('x00181411', 'ExposureIndex'),
    targetExposureIndex: number('x00181412', 'TargetExposureIndex'),
    deviationIndex: number('x00181413', 'DeviationIndex'),
    relativeXRayExposure: number('x00181405', 'RelativeXRayExposure'),
    sensitivity: number('x00186000', 'Sensitivity'),
    detectorId: stringValue(ds, 'x0018700a'),
    detectorType: stringValue(ds, 'x00187004'),
    imagerPixelSpacingMm: spacing('x00181164', 'ImagerPixelSpacing'),
    pixelSpacingMm: spacing('x00280030', 'PixelSpacing'),
    stationName: stringValue(ds, 'x00081010'),
    deviceSerialNumber: stringValue(ds, 'x00181000'),
    manufacturer: stringValue(ds, 'x00080070'),
    manufacturerModelName: stringValue(ds, 'x00081090'),
    bodyPartThicknessMm: number('x001811a0', 'BodyPartThickness'),
    bodyPartExamined: stringValue(ds, 'x00180015'),
    viewPosition: stringValue(ds, 'x00185101'),
    presentationIntentType: stringValue(ds, 'x00080068'),
    pixelIntensityRelationship: stringValue(ds, 'x00281040'),
    pixelIntensityRelationshipSign: number(
      'x00281041',
      'PixelIntensityRelationshipSign',
    ),
    lossyImageCompression: stringValue(ds, 'x00282110'),
    lossyImageCompressionRatio: numbers(
      'x00282112',
      'LossyImageCompressionRatio',
    ),
    lossyImageCompressionMethod: strings('x00282114'),
    modality: stringValue(ds, 'x00080060'),
    sopInstanceUid: stringValue(ds, 'x00080018'),
    sopClassUid: stringValue(ds, 'x00080016'),
    studyInstanceUid: stringValue(ds, 'x0020000d'),
    seriesInstanceUid: stringValue(ds, 'x0020000e'),
    acquisitionDateTime:
      isoFromDt(stringValue(ds, 'x0008002a')) ??
      isoDateTime(stringValue(ds, 'x00080022'), stringValue(ds, 'x00080032')) ??
      isoDateTime(stringValue(ds, 'x00080023'), stringValue(ds, 'x00080033')),
  };
  return { acquisition, warnings };
}
