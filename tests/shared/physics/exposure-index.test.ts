import { describe, expect, it } from 'vitest';
import {
  deviationIndex,
  exposureIndexFromAirKerma,
  exposureRatioFromDeviationIndex,
} from '../../../shared/physics/exposure-index.ts';

describe('exposure and deviation index (IEC 62494-1)', () => {
  it.each([
    [-3, 0.5012],
    [-1, 0.7943],
    [1, 1.2589],
    [3, 1.9953],
  ])('DI %d means %f of the target exposure', (di, fraction) => {
    // PHYSICS.md §4 IEC 62494-1 check values (derived from DI = 10·log10(EI/EI_T)).
    expect(exposureRatioFromDeviationIndex(di)).toBeCloseTo(fraction, 4);
    expect(deviationIndex(fraction * 400, 400)).toBeCloseTo(di, 3);
  });

  it('gives DI 0.969 for EI 500 with target 400', () => {
    // PHYSICS.md §4 IEC 62494-1 check value.
    expect(deviationIndex(500, 400)).toBeCloseTo(0.969, 3);
  });

  it('gives EI 100 at 1 µGy and is proportional to air kerma', () => {
    // IEC 62494-1:2008 as summarised in PHYSICS.md §4: EI = 100 at 1 µGy (RQA5).
    expect(exposureIndexFromAirKerma(1)).toBe(100);
    expect(exposureIndexFromAirKerma(2.5)).toBeCloseTo(250, 10);
  });

  it('rejects a non-positive index or target', () => {
    expect(() => deviationIndex(0, 400)).toThrow(
      expect.objectContaining({ code: 'analysis_failed' }),
    );
    expect(() => deviationIndex(500, -1)).toThrow(
      expect.objectContaining({ code: 'analysis_failed' }),
    );
    expect(() =>
      exposureRatioFromDeviationIndex(Number.POSITIVE_INFINITY),
    ).toThrow(expect.objectContaining({ code: 'analysis_failed' }));
    expect(() => exposureIndexFromAirKerma(-1)).toThrow(
      expect.objectContaining({ code: 'analysis_failed' }),
    );
  });
});
