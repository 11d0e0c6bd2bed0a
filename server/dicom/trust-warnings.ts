import {
  isKnownTransferSyntax,
  JPEG_2000,
  JPEG_LS_NEAR_LOSSLESS,
  TRANSFER_SYNTAXES,
} from '../../shared/dicom/transfer-syntaxes.ts';
import { FOR_PRESENTATION_SOP_CLASSES } from '../../shared/dicom/sop-classes.ts';
import type { Warning } from '../../shared/warnings.ts';
import type { Acquisition } from './acquisition.ts';

/** What the trust checks need to know about an image. */
export interface TrustFacts {
  acquisition: Acquisition;
  transferSyntaxUid: string;
  photometricInterpretation: string;
  bitsStored: number;
  pixelSpacingFound: boolean;
  patientIdentifiers: string[];
  /** From the codec, when the frame was decoded: JPEG-LS NEAR and J2K reversibility. */
  nearLossless?: number;
  reversible?: boolean;
}

/**
 * Whether stored values fall as beam intensity rises, so that signal must be
 * taken as (2^BitsStored − 1) − value: Pixel Intensity Relationship Sign −1,
 * or MONOCHROME1 when the sign is not given (DICOM PS3.3 C.8.11.3.1.2 and
 * C.7.6.3.1.2).
 */
export function isSignalInverted(
  acquisition: Acquisition,
  photometricInterpretation: string,
): boolean {
  const sign = acquisition.pixelIntensityRelationshipSign;
  return (
    sign === -1 ||
    (sign === null && photometricInterpretation === 'MONOCHROME1')
  );
}

/**
 * The trust warnings of an image: everything that makes a measurement on it
 * doubtful. Codes are stable snake_case.
 */
export function trustWarnings(facts: TrustFacts): Warning[] {
  const { acquisition: a } = facts;
  const warnings: Warning[] = [];
  const forPresentation =
    a.presentationIntentType === 'FOR PRESENTATION' ||
    (a.sopClassUid !== null &&
      FOR_PRESENTATION_SOP_CLASSES.includes(a.sopClassUid));
  if (forPresentation) {
    warnings.push({
      code: 'for_presentation',
      message:
        'The image is FOR PRESENTATION: the modality has processed it for display (contrast curves, edge enhancement), so its values are not proportional to detector exposure. Use FOR PROCESSING (raw) images for grid measurements.',
    });
  }
  const ts = facts.transferSyntaxUid;
  const lossySyntax = isKnownTransferSyntax(ts) && TRANSFER_SYNTAXES[ts].lossy;
  if (lossySyntax || a.lossyImageCompression === '01') {
    const reasons: string[] = [];
    if (lossySyntax)
      reasons.push(
        `its transfer syntax (${TRANSFER_SYNTAXES[ts as keyof typeof TRANSFER_SYNTAXES].name}) allows loss`,
      );
    if (a.lossyImageCompression === '01') {
      const ratio = a.lossyImageCompressionRatio?.[0];
      reasons.push(
        `Lossy Image Compression is 01${ratio ? ` (ratio ${ratio}:1)` : ''}`,
      );
    }
    let note = '';
    if (ts === JPEG_LS_NEAR_LOSSLESS && facts.nearLossless !== undefined) {
      note =
        facts.nearLossless === 0
          ? ' The codestream itself says NEAR = 0.'
          : ` The codestream uses NEAR = ${facts.nearLossless}.`;
    }
    if (ts === JPEG_2000 && facts.reversible !== undefined) {
      note = facts.reversible
        ? ' The codestream itself uses the reversible wavelet.'
        : ' The codestream uses the irreversible wavelet.';
    }
    warnings.push({
      code: 'lossy_compression',
      message: `The image may have been compressed with loss: ${reasons.join('; ')}. Noise, SD and CNR are not valid on such data.${note}`,
    });
  }
  if (a.pixelIntensityRelationship === 'LOG') {
    warnings.push({
      code: 'log_relationship_uncalibrated',
      message:
        'Pixel values are logarithmic in exposure (Pixel Intensity Relationship LOG) and no detector calibration has been applied: contrast, CNR and SNR need linearised signals.',
    });
  }
  if (isSignalInverted(a, facts.photometricInterpretation)) {
    const max = 2 ** facts.bitsStored - 1;
    const why =
      a.pixelIntensityRelationshipSign === -1
        ? 'Pixel Intensity Relationship Sign is −1 (higher values mean less beam intensity)'
        : 'the image is MONOCHROME1 and gives no Pixel Intensity Relationship Sign';
    warnings.push({
      code:
        a.pixelIntensityRelationshipSign === -1
          ? 'inverted_sign'
          : 'monochrome1',
      message: `${why[0]!.toUpperCase()}${why.slice(1)}; without a detector calibration, signal is taken as ${max} − value (2^BitsStored − 1 − value).`,
    });
  }
  if (a.exposureMas === null) {
    warnings.push({
      code: 'missing_exposure',
      message:
        'The file gives no exposure (µAs, mAs, or tube current and time): dose-normalised figures need it entered.',
    });
  }
  if (a.kvp === null) {
    warnings.push({
      code: 'missing_kvp',
      message: 'The file gives no tube voltage (KVP).',
    });
  }
  if (!facts.pixelSpacingFound) {
    warnings.push({
      code: 'missing_pixel_spacing',
      message:
        'The file gives neither Imager Pixel Spacing nor Pixel Spacing: regions can be placed in pixels only.',
    });
  }
  if (a.modality !== 'DX' && a.modality !== 'CR') {
    warnings.push({
      code: 'not_dx_or_cr',
      message: `The image is ${a.modality ? `modality ${a.modality}` : 'of no stated modality'}, not a DX or CR radiograph.`,
    });
  }
  if (facts.patientIdentifiers.length > 0) {
    warnings.push({
      code: 'patient_identifiers_present',
      message: `The file carries patient-identifying attributes (${facts.patientIdentifiers.join(', ')}); Lamella never shows, stores in its header copy or exports them. Anonymise phantom files at the modality if you can.`,
    });
  }
  return warnings;
}
