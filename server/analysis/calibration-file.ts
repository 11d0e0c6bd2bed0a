import { readFile } from 'node:fs/promises';
import { z } from 'zod';
import type { CalibrationResult } from '../../shared/analysis/detector-calibration.ts';
import { fitDetectorCalibration } from '../../shared/analysis/detector-calibration.ts';
import { DomainError } from '../../shared/errors.ts';

/**
 * A detector calibration file: flat-field points (detector air kerma in µGy
 * measured with a dosimeter, mean pixel value of the flat field) and,
 * optionally, the model to use.
 * `{"points":[{"airKermaUgy":1.2,"meanPixelValue":1530},…],"model":"linear"}`
 */
export const calibrationFileSchema = z.object({
  points: z
    .array(
      z.object({
        airKermaUgy: z.number().finite(),
        meanPixelValue: z.number().finite(),
      }),
    )
    .min(3),
  model: z.enum(['linear', 'logarithmic', 'power']).optional(),
});

/**
 * Reads and fits a calibration file.
 * @throws DomainError('file_unreadable') when it cannot be read;
 *   DomainError('validation_failed') when it is not valid JSON of that shape
 *   or the points cannot be fitted.
 */
export async function readCalibrationFile(
  file: string,
): Promise<CalibrationResult> {
  let text: string;
  try {
    text = await readFile(file, 'utf8');
  } catch (error) {
    throw new DomainError(
      'file_unreadable',
      `Cannot read the calibration file ${file} (${(error as NodeJS.ErrnoException).code ?? 'error'}).`,
    );
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch {
    throw new DomainError('validation_failed', `${file} is not valid JSON.`);
  }
  const parsed = calibrationFileSchema.safeParse(json);
  if (!parsed.success) {
    const issue = parsed.error.issues[0]!;
    throw new DomainError(
      'validation_failed',
      `Calibration file ${file}: ${issue.path.join('.') || '(root)'}: ${issue.message}`,
    );
  }
  return fitDetectorCalibration(parsed.data.points, parsed.data.model);
}
