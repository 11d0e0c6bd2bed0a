import { describe, expect, it } from 'vitest';
import { fitDetectorCalibration } from '../../../shared/analysis/detector-calibration.ts';
import { signalDomain } from '../../../shared/analysis/signal-domain.ts';

const source = (pixels: Uint16Array | Float64Array, overrides = {}) => ({
  pixels,
  bitsStored: 12,
  photometricInterpretation: 'MONOCHROME2',
  pixelIntensityRelationship: 'LIN',
  signalInverted: false,
  ...overrides,
});

describe('signal domain', () => {
  it('uses stored values as they are for linear, non-inverted data', () => {
    const pixels = new Uint16Array([1, 2, 3]);
    const domain = signalDomain(source(pixels));

    expect(domain.lut).toBeNull();
    expect(domain.pixels).toBe(pixels);
    expect(domain.method).toBe('stored-values');
  });

  it('inverts with (2^BitsStored − 1) − value when the signal falls with intensity', () => {
    const domain = signalDomain(
      source(new Uint16Array([0, 4095]), { signalInverted: true }),
    );

    expect(domain.method).toBe('inverted-stored-values');
    expect(domain.lut!.table[0 + domain.lut!.offset]).toBe(4095);
    expect(domain.lut!.table[4000 + domain.lut!.offset]).toBe(95);
  });

  it('applies a calibration inverse, also to float data and inverted data', () => {
    const fit = fitDetectorCalibration(
      [1, 2, 4].map((k) => ({ airKermaUgy: k, meanPixelValue: 100 + 50 * k })),
    ).chosen;

    const integer = signalDomain(
      source(new Uint16Array([150]), { signalInverted: true }),
      fit,
    );
    const float = signalDomain(source(new Float64Array([150, 300])), fit);

    expect(integer.method).toBe('calibrated-linear');
    expect(integer.lut!.table[150 + integer.lut!.offset]).toBeCloseTo(1, 12);
    expect(float.pixels[0]).toBeCloseTo(1, 12);
    expect(float.pixels[1]).toBeCloseTo(4, 12);
    expect(float.description).toContain('air kerma');
  });

  it('says when logarithmic values are used without calibration', () => {
    expect(
      signalDomain(
        source(new Uint16Array(1), { pixelIntensityRelationship: 'LOG' }),
      ).description,
    ).toContain('logarithmic');
  });
});
