import { createHash } from 'node:crypto';
import dcmjs from 'dcmjs';
import { DX_FOR_PROCESSING_SOP_CLASS } from '../../shared/dicom/sop-classes.ts';
import { EXPLICIT_VR_LITTLE_ENDIAN } from '../../shared/dicom/transfer-syntaxes.ts';

const { DicomDict, DicomMetaDictionary } = dcmjs.data;

/** Lamella's implementation class UID (a 2.25 UUID-derived root, PS3.5 B.2). */
const IMPLEMENTATION_CLASS_UID = '2.25.208418126345736406154410812946431707449';

/** A synthetic greyscale image and its attributes, by DICOM keyword. */
export interface SyntheticImage {
  rows: number;
  columns: number;
  pixels: Uint16Array | Int16Array;
  attributes: Record<string, string | number | number[] | string[]>;
}

/** A 2.25 UID derived from a hash, so the same image always gets the same UID. */
function derivedUid(seed: string): string {
  const hex = createHash('sha256').update(seed).digest('hex').slice(0, 30);
  return `2.25.${BigInt(`0x${hex}`).toString()}`;
}

/**
 * Writes a synthetic greyscale image as a DICOM Part 10 file in explicit VR
 * little endian, by default a DX For Processing image (modality DX, FOR
 * PROCESSING, MONOCHROME2, 16 bits allocated and stored). Attributes given by
 * keyword override the defaults; UIDs left out are derived from the content,
 * so output is deterministic. For test and demo images only.
 *
 * @throws Error for a pixel count that does not match rows × columns or an
 *   unknown keyword.
 */
export function writeDicom(image: SyntheticImage): Uint8Array {
  const { rows, columns, pixels, attributes } = image;
  if (pixels.length !== rows * columns) {
    throw new Error(
      `writeDicom: ${pixels.length} pixels for ${columns} × ${rows}.`,
    );
  }
  for (const keyword of Object.keys(attributes)) {
    if (!DicomMetaDictionary.nameMap[keyword]) {
      throw new Error(`writeDicom: '${keyword}' is not a DICOM keyword.`);
    }
  }
  const signed = pixels instanceof Int16Array;
  const bytes = new Uint8Array(
    pixels.buffer,
    pixels.byteOffset,
    pixels.byteLength,
  );
  const seed = createHash('sha256')
    .update(bytes)
    .update(JSON.stringify(attributes))
    .digest('hex');
  const bitsStored = Number(attributes.BitsStored ?? 16);
  const dataset: Record<string, unknown> = {
    SOPClassUID: DX_FOR_PROCESSING_SOP_CLASS,
    SOPInstanceUID: derivedUid(`${seed}:instance`),
    StudyInstanceUID: derivedUid(`${seed}:study`),
    SeriesInstanceUID: derivedUid(`${seed}:series`),
    Modality: 'DX',
    PresentationIntentType: 'FOR PROCESSING',
    Manufacturer: 'Lamella synthetic phantom',
    InstitutionName: 'Saltmarsh General Hospital',
    SamplesPerPixel: 1,
    PhotometricInterpretation: 'MONOCHROME2',
    PixelIntensityRelationship: 'LIN',
    PixelIntensityRelationshipSign: 1,
    RescaleIntercept: 0,
    RescaleSlope: 1,
    RescaleType: 'US',
    BitsAllocated: 16,
    BitsStored: bitsStored,
    HighBit: bitsStored - 1,
    PixelRepresentation: signed ? 1 : 0,
    ...attributes,
    Rows: rows,
    Columns: columns,
    // dcmjs writes PixelData from ArrayBuffers; copy the view's own bytes.
    PixelData: [bytes.slice().buffer],
    _vrMap: { PixelData: 'OW' },
  };
  const meta = {
    FileMetaInformationVersion: new Uint8Array([0, 1]).buffer,
    MediaStorageSOPClassUID: dataset.SOPClassUID,
    MediaStorageSOPInstanceUID: dataset.SOPInstanceUID,
    TransferSyntaxUID: EXPLICIT_VR_LITTLE_ENDIAN,
    ImplementationClassUID: IMPLEMENTATION_CLASS_UID,
    ImplementationVersionName: 'LAMELLA_0_1',
    _vrMap: { FileMetaInformationVersion: 'OB' },
  };
  const dict = new DicomDict(DicomMetaDictionary.denaturalizeDataset(meta));
  dict.dict = DicomMetaDictionary.denaturalizeDataset(dataset);
  return new Uint8Array(dict.write());
}
