import type { DataSet } from 'dicom-parser';
import type { Warning } from '../../shared/warnings.ts';
import { numericValues, stringValue, stringValues } from './dicom-values.ts';

/** A row × column spacing pair in mm, as DICOM stores it (row spacing first). */
export interface SpacingMm {
  rowMm: number;
  columnMm: number;
}

/**
 * Acquisition facts of a projection radiograph (PHYSICS.md §9), typed and in
 * the units their names carry; null when the file does not say.
 */
export interface Acquisition {
  /** Peak tube voltage, kV (KVP 0018,0060). */
  kvp: number | null;
  /** Tube current–time product, mAs, from the most precise attribute present. */
  exposureMas: number | null;
  /** Which attribute gave exposureMas: µAs (0018,1153), mAs (0018,1152) or current × time. */
  exposureMasSource: 'ExposureInuAs' | 'Exposure' | 'CurrentTime' | null;
  /** Tube current, mA (0018,8151 in µA preferred over 0018,1151 in mA). */
  tubeCurrentMa: number | null;
  /** Exposure time, ms (0018,8150 in µs preferred over 0018,1150 in ms). */
  exposureTimeMs: number | null;
  /** Distance Source to Detector (0018,1110), mm. */
  sidMm: number | null;
  /** Distance Source to Patient (0018,1111), mm. */
  sourceToPatientMm: number | null;
  /**
   * Image and Fluoroscopy Area Dose Product (0018,115E) in dGy·cm², the unit
   * DICOM PS3.3 defines for it (1 dGy·cm² = 0.1 Gy·cm² = 100 mGy·cm²).
   */
  dapDgyCm2: number | null;
  /** Entrance Dose in mGy (0040,8302). */
  entranceDoseMgy: number | null;
  /** Filter Material (0018,7050), one value per filter. */
  filterMaterial: string[] | null;
  /** Filter Thickness Minimum (0018,7052), mm, one value per filter. */
  filterThicknessMinMm: number[] | null;
  /** Filter Thickness Maximum (0018,7054), mm, one value per filter. */
  filterThicknessMaxMm: number[] | null;
  /** Grid (0018,1166): FIXED, FOCUSED, RECIPROCATING, PARALLEL, CROSSED, NONE. */
  grid: string[] | null;
  gridAbsorbingMaterial: string | null;
  gridSpacingMaterial: string | null;
  /** Grid Thickness (0018,7042), mm. */
  gridThicknessMm: number | null;
  /** Grid Pitch (0018,7044), mm (strip frequency = 10 / pitch lines per cm). */
  gridPitchMm: number | null;
  /** Grid Aspect Ratio (0018,7046), the integer pair as stored. */
  gridAspectRatio: [number, number] | null;
  /** Grid Period (0018,7048): reciprocation time in ms, not the pitch. */
  gridPeriodMs: number | null;
  /** Grid Focal Distance (0018,704C), mm. */
  gridFocalDistanceMm: number | null;
  /** Grid ID (0018,1006). */
  gridId: string | null;
  /** Exposure Index (0018,1411), IEC 62494-1. */
  exposureIndex: number | null;
  targetExposureIndex: number | null;
  deviationIndex: number | null;
  relativeXRayExposure: number | null;
  sensitivity: number | null;
  detectorId: string | null;
  detectorType: string | null;
  /** Imager Pixel Spacing (0018,1164): at the detector plane. */
  imagerPixelSpacingMm: SpacingMm | null;
  /** Pixel Spacing (0028,0030): in the patient plane when calibrated. */
  pixelSpacingMm: SpacingMm | null;
  stationName: string | null;
  deviceSerialNumber: string | null;
  manufacturer: string | null;
  manufacturerModelName: string | null;
  /** Body Part Thickness (0018,11A0), mm. */
  bodyPartThicknessMm: number | null;
  bodyPartExamined: string | null;
  viewPosition: string | null;
  /** FOR PROCESSING or FOR PRESENTATION (0008,0068). */
  presentationIntentType: string | null;
  /** LIN or LOG (0028,1040). */
  pixelIntensityRelationship: string | null;
  /** +1 or −1 (0028,1041). */
  pixelIntensityRelationshipSign: number | null;
  /** "00" or "01" (0028,2110). */
  lossyImageCompression: string | null;
  lossyImageCompressionRatio: number[] | null;
  lossyImageCompressionMethod: string[] | null;
  modality: string | null;
  sopInstanceUid: string | null;
  sopClassUid: string | null;
  studyInstanceUid: string | null;
  seriesInstanceUid: string | null;
  /** ISO 8601 local date-time (no zone unless the file gives one). */
  acquisitionDateTime: string | null;
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
  const spacing = (tag: string, keyword: string): SpacingMm | null => {
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
