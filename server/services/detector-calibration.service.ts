import {
  type CreateCalibrationInput,
  type FitCalibrationInput,
} from '../../shared/schemas/equipment.schema.ts';
import { checkCalibrationFit } from '../../shared/schemas/equipment-rules.ts';
import type { CalibrationResult } from '../../shared/analysis/detector-calibration.ts';
import { notFound, validationFailed } from '../errors.ts';
import { enqueueDetectorRecompute } from '../jobs/recompute-study.job.ts';
import { DetectorCalibration } from '../models/detector-calibration.model.ts';
import type { Detector } from '../models/detector.model.ts';
import type { AuditContext } from './audit.service.ts';
import { auditedChange, snapshot } from './equipment.service.ts';

/** A detector's calibration records, newest first. */
export function listCalibrations(
  detectorId: number,
): Promise<DetectorCalibration[]> {
  return DetectorCalibration.findAll({
    where: { detectorId },
    order: [
      ['calibratedOn', 'DESC'],
      ['id', 'DESC'],
    ],
  });
}

/** @throws AppError 404 when the detector has no such record. */
export async function findCalibration(
  detector: Detector,
  calibrationId: number,
): Promise<DetectorCalibration> {
  const calibration = await DetectorCalibration.findOne({
    where: { id: calibrationId, detectorId: detector.id },
  });
  if (!calibration) throw notFound('calibration record');
  return calibration;
}

/**
 * Fits the linear, logarithmic and power conversion functions to the points
 * and chooses the requested model or the best R².
 * @throws AppError 400 naming `points` or `model` when no fit is possible.
 * @see IEC 62220-1-1:2015 (conversion function); PHYSICS.md §4.
 */
export function fitCalibrationPreview(
  input: FitCalibrationInput,
): CalibrationResult {
  const { result, problems } = checkCalibrationFit(input.points, input.model);
  if (!result) throw validationFailed(problems);
  return result;
}

/**
 * Records a calibration of the detector with its fits and chosen model.
 * @throws AppError 400 naming `points` or `model` when no fit is possible.
 * @see IEC 62220-1-1:2015 (conversion function); PHYSICS.md §4.
 */
export function createCalibration(
  detector: Detector,
  input: CreateCalibrationInput,
  audit: AuditContext,
): Promise<DetectorCalibration> {
  const { fits, chosen, choice } = fitCalibrationPreview(input);
  return auditedChange(audit, {}, async (transaction) => {
    const calibration = await DetectorCalibration.create(
      {
        detectorId: detector.id,
        calibratedOn: input.calibratedOn,
        beamQualityNote: input.beamQualityNote,
        points: input.points,
        model: chosen.model,
        modelChoice: choice,
        parameters: { a: chosen.a, b: chosen.b },
        rSquared: chosen.rSquared,
        residuals: chosen.residuals,
        residualSd: chosen.residualSd,
        fits,
        notes: input.notes ?? null,
      },
      { transaction },
    );
    await enqueueDetectorRecompute(detector.id, { transaction });
    return {
      result: calibration,
      event: {
        action: 'detector_calibration.created',
        targetType: 'detector_calibration',
        targetId: calibration.id,
        details: {
          detectorId: detector.id,
          model: chosen.model,
          rSquared: chosen.rSquared,
          choice,
        },
      },
    };
  });
}

/** @throws AppError 409 when a study still uses the calibration. */
export function deleteCalibration(
  calibration: DetectorCalibration,
  audit: AuditContext,
): Promise<void> {
  return auditedChange(
    audit,
    { inUse: 'This calibration is used by a study, so it cannot be deleted.' },
    async (transaction) => {
      const details = snapshot(calibration);
      await calibration.destroy({ transaction });
      await enqueueDetectorRecompute(calibration.detectorId, { transaction });
      return {
        result: undefined,
        event: {
          action: 'detector_calibration.deleted',
          targetType: 'detector_calibration',
          targetId: calibration.id,
          details,
        },
      };
    },
  );
}
