import type { DoseMeasure } from '../../shared/analysis/condition-figures.ts';
import type { RegionLayout } from '../../shared/analysis/region-layout.ts';
import type { SignalSource } from '../../shared/analysis/signal-domain.ts';
import type { DecodedImage } from '../dicom/decode-dicom.ts';

/**
 * What the analysis needs of a decoded image: a DecodedImage fits as it is,
 * with a label (file name or image id) to name it in results.
 */
export type AnalysisImage = Pick<
  DecodedImage,
  | 'rows'
  | 'columns'
  | 'pixels'
  | 'bitsStored'
  | 'photometricInterpretation'
  | 'pixelSpacing'
  | 'acquisition'
  | 'signalInverted'
  | 'warnings'
> & {
  label: string;
  /**
   * This image's own placement of the condition's layout (same regions, in
   * the same order, e.g. shifted to follow the phantom); the condition's
   * layout when absent.
   */
  layout?: RegionLayout;
};

/**
 * The dose measure D of an image: exposure in mAs, DAP in dGy·cm² or
 * entrance dose in mGy, from its acquisition data; null when absent.
 */
export function doseOf(
  image: AnalysisImage,
  measure: DoseMeasure,
): number | null {
  const a = image.acquisition;
  const value =
    measure === 'mas'
      ? a.exposureMas
      : measure === 'dap'
        ? a.dapDgyCm2
        : a.entranceDoseMgy;
  return value !== null && value > 0 ? value : null;
}

/** The facts of an image that decide its signal domain. */
export function signalSourceOf(image: AnalysisImage): SignalSource {
  return {
    pixels: image.pixels,
    bitsStored: image.bitsStored,
    photometricInterpretation: image.photometricInterpretation,
    pixelIntensityRelationship: image.acquisition.pixelIntensityRelationship,
    signalInverted: image.signalInverted,
  };
}
