import { describe, expect, it } from 'vitest';
import {
  airKermaFromPixelValue,
  calibrationForward,
  calibrationLookupTable,
  fitDetectorCalibration,
} from '../../../shared/analysis/detector-calibration.ts';
import type { CalibrationPoint } from '../../../shared/analysis/detector-calibration.ts';
import { createSeededRandom } from '../../../server/synthetic/seeded-random.ts';
import {
  requireReferencePython,
  runReferenceScript,
} from '../../helpers/dicom-reference-python.ts';

const KERMAS_UGY = [0.5, 1, 2, 4, 8, 16];

function points(
  response: (k: number) => number,
  noiseSd = 0,
  seed = 1,
): CalibrationPoint[] {
  const random = createSeededRandom(seed);
  return KERMAS_UGY.map((k) => ({
    airKermaUgy: k,
    meanPixelValue: response(k) + noiseSd * random.normal(),
  }));
}

describe('detector calibration fits', () => {
  it.each([
    ['linear', (k: number) => 100 + 250 * k, 100, 250],
    ['logarithmic', (k: number) => 2000 + 450 * Math.log(k), 2000, 450],
    ['power', (k: number) => 300 * k ** 0.8, 300, 0.8],
  ] as const)(
    'recovers a noise-free %s response exactly and chooses it',
    (model, response, a, b) => {
      const result = fitDetectorCalibration(points(response));

      expect(result.chosen.model).toBe(model);
      expect(result.choice).toBe('best R²');
      expect(result.chosen.a).toBeCloseTo(a, 6);
      expect(result.chosen.b).toBeCloseTo(b, 8);
      expect(result.chosen.rSquared).toBeCloseTo(1, 12);
      expect(result.fits).toHaveLength(3);
    },
  );

  it('agrees with numpy polyfit for the linear and logarithmic models on noisy points', () => {
    requireReferencePython(['numpy']);
    const noisy = points((k) => 2000 + 450 * Math.log(k), 15, 7);
    const reference = runReferenceScript<{
      lines: Array<{ intercept: number; slope: number }>;
    }>('numpy_analysis.py', [], {
      lines: [
        {
          x: noisy.map((p) => p.airKermaUgy),
          y: noisy.map((p) => p.meanPixelValue),
        },
        {
          x: noisy.map((p) => Math.log(p.airKermaUgy)),
          y: noisy.map((p) => p.meanPixelValue),
        },
      ],
    });

    const linear = fitDetectorCalibration(noisy, 'linear').chosen;
    const logarithmic = fitDetectorCalibration(noisy, 'logarithmic').chosen;

    // tests/reference/numpy_analysis.py (numpy.polyfit degree 1).
    expect(linear.a).toBeCloseTo(reference.lines[0]!.intercept, 8);
    expect(linear.b).toBeCloseTo(reference.lines[0]!.slope, 8);
    expect(logarithmic.a).toBeCloseTo(reference.lines[1]!.intercept, 8);
    expect(logarithmic.b).toBeCloseTo(reference.lines[1]!.slope, 8);
    expect(fitDetectorCalibration(noisy).chosen.model).toBe('logarithmic');
  });

  it('fits the power law by least squares in pixel values (zero gradient at the optimum)', () => {
    const noisy = points((k) => 300 * k ** 0.8, 20, 3);

    const fit = fitDetectorCalibration(noisy, 'power').chosen;

    let gradA = 0;
    let gradB = 0;
    noisy.forEach((p, i) => {
      const kb = p.airKermaUgy ** fit.b;
      gradA += fit.residuals[i]! * kb;
      gradB += fit.residuals[i]! * fit.a * kb * Math.log(p.airKermaUgy);
    });
    const scale = noisy.reduce((s, p) => s + p.meanPixelValue, 0);
    expect(Math.abs(gradA) / scale).toBeLessThan(1e-9);
    expect(Math.abs(gradB) / scale).toBeLessThan(1e-9);
    expect(fit.residuals.reduce((s, r) => s + r * r, 0)).toBeCloseTo(
      fit.residualSd ** 2 * (noisy.length - 2),
      8,
    );
  });

  it('inverts each model back to the air kerma, also through a lookup table', () => {
    for (const [response, model] of [
      [(k: number) => 100 + 250 * k, 'linear'],
      [(k: number) => 2000 + 450 * Math.log(k), 'logarithmic'],
      [(k: number) => 300 * k ** 0.8, 'power'],
    ] as const) {
      const fit = fitDetectorCalibration(points(response), model).chosen;
      expect(airKermaFromPixelValue(fit, response(3))).toBeCloseTo(3, 8);
      const lut = calibrationLookupTable(fit, 0, 4095);
      const pv = Math.round(response(6));
      expect(lut.table[pv + lut.offset]).toBeCloseTo(
        airKermaFromPixelValue(fit, pv),
        12,
      );
    }
  });

  it.each([
    // Worked by hand from the model forms in PHYSICS.md §4.
    ['linear', 100, 250, 2, 600],
    ['logarithmic', 2000, 450, Math.E, 2450],
    ['power', 300, 0.5, 4, 600],
  ] as const)(
    'evaluates the %s model forward and inverts back to the same air kerma',
    (model, a, b, airKermaUgy, pixelValue) => {
      const fit = { model, a, b, rSquared: 1, residuals: [], residualSd: 0 };

      expect(calibrationForward(fit, airKermaUgy)).toBeCloseTo(pixelValue, 10);
      expect(airKermaFromPixelValue(fit, pixelValue)).toBeCloseTo(
        airKermaUgy,
        10,
      );
    },
  );

  it('handles signed ranges and negative slopes (sign −1 data)', () => {
    const fit = fitDetectorCalibration(points((k) => 3000 - 200 * k)).chosen;
    const lut = calibrationLookupTable(fit, -100, 100);

    expect(fit.b).toBeCloseTo(-200, 8);
    expect(lut.offset).toBe(100);
    expect(lut.table[0]).toBeCloseTo((-100 - 3000) / -200, 10);
  });

  it('refuses too few points, one kerma value, and a model the points cannot support', () => {
    expect(() => fitDetectorCalibration(points((k) => k).slice(0, 2))).toThrow(
      expect.objectContaining({ code: 'validation_failed' }),
    );
    expect(() =>
      fitDetectorCalibration(
        [1, 2, 3].map((v) => ({ airKermaUgy: 1, meanPixelValue: v })),
      ),
    ).toThrow(expect.objectContaining({ code: 'validation_failed' }));
    expect(() =>
      fitDetectorCalibration(
        [0, 1, 2].map((k) => ({ airKermaUgy: k, meanPixelValue: 10 + k })),
        'logarithmic',
      ),
    ).toThrow(expect.objectContaining({ code: 'validation_failed' }));
  });
});
