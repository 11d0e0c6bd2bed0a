import { describe, expect, it } from 'vitest';
import { DomainError } from '../../../shared/errors.ts';
import { invertedSignalLut } from '../../../shared/dicom/signal-polarity.ts';
import { regionStatistics } from '../../../shared/roi/region-statistics.ts';
import { decodeDicom } from '../../../server/dicom/decode-dicom.ts';
import { writeDicom } from '../../../server/dicom/write-dicom.ts';

type Attributes = Record<string, string | number | number[] | string[]>;

/** A complete, trustworthy DX For Processing header (invented values). */
const CLEAN: Attributes = {
  KVP: 70,
  ExposureInuAs: 2500,
  ImagerPixelSpacing: [0.143, 0.143],
  StationName: 'SGH-DX1',
};

/** Decodes a square synthetic image (side √n) with the given attributes. */
function image(attributes: Attributes, pixels?: Uint16Array | Int16Array) {
  const values = pixels ?? Uint16Array.from({ length: 16 }, (_, i) => 100 + i);
  const side = Math.sqrt(values.length);
  return decodeDicom(
    writeDicom({ rows: side, columns: side, pixels: values, attributes }),
  );
}

async function codes(attributes: Attributes): Promise<string[]> {
  return (await image(attributes)).warnings.map((w) => w.code);
}

describe('trust warnings', () => {
  it('raises none for a complete DX For Processing image', async () => {
    expect(await codes(CLEAN)).toEqual([]);
  });

  it.each([
    [{ PresentationIntentType: 'FOR PRESENTATION' }, 'for_presentation'],
    [{ SOPClassUID: '1.2.840.10008.5.1.4.1.1.1.1' }, 'for_presentation'],
    [
      { LossyImageCompression: '01', LossyImageCompressionRatio: 8 },
      'lossy_compression',
    ],
    [{ PixelIntensityRelationship: 'LOG' }, 'log_relationship_uncalibrated'],
    [{ PixelIntensityRelationshipSign: -1 }, 'inverted_sign'],
    [{ Modality: 'MR' }, 'not_dx_or_cr'],
    [
      { PatientName: 'PHANTOM^CHEST', PatientID: 'SGH-0001' },
      'patient_identifiers_present',
    ],
  ] as Array<[Attributes, string]>)('%j raises %s', async (extra, code) => {
    expect(await codes({ ...CLEAN, ...extra })).toEqual([code]);
  });

  it('raises monochrome1 for MONOCHROME1 without a sign, and no warning with sign +1', async () => {
    const { PixelIntensityRelationshipSign: _sign, ...rest } = {
      ...CLEAN,
      PhotometricInterpretation: 'MONOCHROME1',
    } as Attributes;
    const withoutSign = writeDicom({
      rows: 1,
      columns: 2,
      pixels: new Uint16Array([1, 2]),
      attributes: rest,
    });
    // writeDicom writes Sign +1 by default: drop the element (0028,1041).
    const decoded = await decodeDicom(
      removeElement(withoutSign, 0x0028, 0x1041),
    );
    expect(decoded.warnings.map((w) => w.code)).toEqual(['monochrome1']);
    expect(decoded.signalInverted).toBe(true);
    expect(
      await codes({ ...CLEAN, PhotometricInterpretation: 'MONOCHROME1' }),
    ).toEqual([]);
  });

  it('says signal is (2^BitsStored − 1) − value for inverted data, and the table does it', async () => {
    const decoded = await image(
      { ...CLEAN, BitsStored: 12, PixelIntensityRelationshipSign: -1 },
      new Uint16Array([0, 1000, 4095, 2000]),
    );
    expect(decoded.signalInverted).toBe(true);
    expect(decoded.warnings[0]!.message).toContain('4095 − value');

    const { stats } = regionStatistics(
      decoded.pixels,
      2,
      2,
      { shape: 'rect', x0: 0, y0: 0, w: 2, h: 2 },
      { lut: invertedSignalLut(decoded.pixels, decoded.bitsStored) },
    );

    // Hand-checked: 4095 − {0, 1000, 4095, 2000} = {4095, 3095, 0, 2095}.
    expect(stats).toMatchObject({ min: 0, max: 4095, mean: 9285 / 4 });
  });

  it.each([
    [{ ExposureInuAs: undefined }, 'missing_exposure'],
    [{ KVP: undefined }, 'missing_kvp'],
    [{ ImagerPixelSpacing: undefined }, 'missing_pixel_spacing'],
  ] as Array<[Record<string, undefined>, string]>)(
    'raises %s when the attribute is missing',
    async (drop, code) => {
      const attributes = { ...CLEAN };
      for (const key of Object.keys(drop)) delete attributes[key];
      expect(await codes(attributes)).toEqual([code]);
    },
  );

  it('warns of a non-numeric value and leaves it null', async () => {
    const decoded = await image({ ...CLEAN, KVP: '7O' });
    expect(decoded.acquisition.kvp).toBeNull();
    expect(decoded.warnings.map((w) => w.code)).toEqual([
      'invalid_attribute_value',
      'missing_kvp',
    ]);
  });
});

describe('patient-identifying attributes', () => {
  it('never reach the header or any output field', async () => {
    const decoded = await image({
      ...CLEAN,
      PatientName: 'Doe^Jane',
      PatientID: 'SGH-123456',
      PatientBirthDate: '19700101',
      OtherPatientIDs: 'OTHER-99',
      PatientAddress: '1 Saltmarsh Lane',
      AccessionNumber: 'ACC-777',
      ReferringPhysicianName: 'Roe^Richard',
    });
    const text = JSON.stringify({ ...decoded, pixels: undefined });

    for (const secret of [
      'Doe',
      'SGH-123456',
      '19700101',
      'OTHER-99',
      'Saltmarsh Lane',
      'ACC-777',
      'Roe',
    ]) {
      expect(text).not.toContain(secret);
    }
    expect(decoded.header).not.toHaveProperty('PatientName');
    expect(decoded.header).toHaveProperty('StationName', 'SGH-DX1');
    expect(
      decoded.warnings.find((w) => w.code === 'patient_identifiers_present')
        ?.message,
    ).toContain('PatientName');
  });
});

describe('acquisition facts', () => {
  it('prefers µAs over mAs, and falls back to current × time', async () => {
    const precise = await image({ ...CLEAN, ExposureInuAs: 2480, Exposure: 2 });
    expect(precise.acquisition).toMatchObject({
      exposureMas: 2.48,
      exposureMasSource: 'ExposureInuAs',
    });

    const { ExposureInuAs: _e, ...noMicro } = CLEAN;
    const whole = await image({ ...noMicro, Exposure: 3 });
    expect(whole.acquisition).toMatchObject({
      exposureMas: 3,
      exposureMasSource: 'Exposure',
    });

    const product = await image({
      ...noMicro,
      XRayTubeCurrentInuA: 250500,
      ExposureTime: 20,
    });
    // 250.5 mA × 20 ms = 5.01 mAs.
    expect(product.acquisition.tubeCurrentMa).toBe(250.5);
    expect(product.acquisition.exposureMas).toBeCloseTo(5.01, 12);
    expect(product.acquisition.exposureMasSource).toBe('CurrentTime');
  });

  it('reads every grid and dose attribute with its unit', async () => {
    const decoded = await image({
      ...CLEAN,
      Grid: ['FOCUSED', 'RECIPROCATING'],
      GridAbsorbingMaterial: 'LEAD',
      GridSpacingMaterial: 'ALUMINUM',
      GridThickness: 1.8,
      GridPitch: 0.025,
      GridAspectRatio: [12, 1],
      GridPeriod: 20,
      GridFocalDistance: 1000,
      GridID: 'SGH-G12-40',
      DistanceSourceToDetector: 1150,
      ImageAndFluoroscopyAreaDoseProduct: 1.25,
      EntranceDoseInmGy: 0.31,
      FilterMaterial: ['ALUMINUM', 'COPPER'],
      FilterThicknessMinimum: [1, 0.1],
      FilterThicknessMaximum: [1, 0.1],
      ExposureIndex: 500,
      TargetExposureIndex: 400,
      DeviationIndex: 0.97,
      BodyPartThickness: 200,
      DetectorID: 'DET-7',
      DetectorType: 'SCINTILLATOR',
      DeviceSerialNumber: 'SN-0042',
      AcquisitionDateTime: '20261201093015.5',
    });

    expect(decoded.acquisition).toMatchObject({
      grid: ['FOCUSED', 'RECIPROCATING'],
      gridAbsorbingMaterial: 'LEAD',
      gridSpacingMaterial: 'ALUMINUM',
      gridThicknessMm: 1.8,
      gridPitchMm: 0.025,
      gridAspectRatio: [12, 1],
      gridPeriodMs: 20,
      gridFocalDistanceMm: 1000,
      gridId: 'SGH-G12-40',
      sidMm: 1150,
      dapDgyCm2: 1.25,
      entranceDoseMgy: 0.31,
      filterMaterial: ['ALUMINUM', 'COPPER'],
      filterThicknessMinMm: [1, 0.1],
      exposureIndex: 500,
      targetExposureIndex: 400,
      deviationIndex: 0.97,
      bodyPartThicknessMm: 200,
      detectorId: 'DET-7',
      detectorType: 'SCINTILLATOR',
      deviceSerialNumber: 'SN-0042',
      stationName: 'SGH-DX1',
      presentationIntentType: 'FOR PROCESSING',
      pixelIntensityRelationship: 'LIN',
      pixelIntensityRelationshipSign: 1,
      modality: 'DX',
      acquisitionDateTime: '2026-12-01T09:30:15.5',
    });
  });

  it('uses Imager Pixel Spacing before Pixel Spacing, row spacing first', async () => {
    const both = await image({
      ...CLEAN,
      ImagerPixelSpacing: [0.1, 0.2],
      PixelSpacing: [0.09, 0.18],
    });
    expect(both.pixelSpacing).toEqual({
      rowMm: 0.1,
      columnMm: 0.2,
      source: 'ImagerPixelSpacing',
    });

    const { ImagerPixelSpacing: _i, ...rest } = CLEAN;
    const only = await image({ ...rest, PixelSpacing: [0.09, 0.18] });
    expect(only.pixelSpacing).toEqual({
      rowMm: 0.09,
      columnMm: 0.18,
      source: 'PixelSpacing',
    });
  });
});

describe('pixel rules', () => {
  it('masks to Bits Stored, dropping bits above it', async () => {
    const decoded = await image(
      { ...CLEAN, BitsStored: 12 },
      new Uint16Array([0xf123, 0x0fff, 0x1000, 5]),
    );
    expect(Array.from(decoded.pixels)).toEqual([0x123, 0xfff, 0, 5]);
  });

  it('sign-extends per Pixel Representation, trusting the dataset', async () => {
    // 12-bit two's complement stored without sign extension.
    const decoded = await image(
      { ...CLEAN, BitsStored: 12, PixelRepresentation: 1 },
      new Uint16Array([0x0fff, 0x0800, 0x07ff, 0xffff]),
    );
    expect(decoded.pixels).toBeInstanceOf(Int16Array);
    expect(Array.from(decoded.pixels)).toEqual([-1, -2048, 2047, -1]);
  });

  it('applies an integral rescale in integers and a fractional one in Float64', async () => {
    const integral = await image(
      { ...CLEAN, RescaleSlope: 2, RescaleIntercept: -100 },
      new Uint16Array([0, 1, 50, 65535]),
    );
    expect(integral.pixels).toBeInstanceOf(Int32Array);
    expect(Array.from(integral.pixels)).toEqual([-100, -98, 0, 130970]);

    const fractional = await image(
      { ...CLEAN, RescaleSlope: 0.5, RescaleIntercept: 0.25 },
      new Uint16Array([0, 1, 3, 4]),
    );
    expect(fractional.pixels).toBeInstanceOf(Float64Array);
    expect(Array.from(fractional.pixels)).toEqual([0.25, 0.75, 1.75, 2.25]);
  });

  it('rejects pixel data whose length does not match the header', async () => {
    const bytes = writeDicom({
      rows: 4,
      columns: 4,
      pixels: new Uint16Array(16),
      attributes: CLEAN,
    });
    // Rows (0028,0010) US 4 → 5: 5 × 4 × 16 bits need 40 bytes, not 32.
    const patched = setUs(bytes, 0x0028, 0x0010, 5);
    await expect(decodeDicom(patched)).rejects.toMatchObject({
      code: 'pixel_data_length_mismatch',
    });
  });

  it('rejects truncated bytes, text and a missing frame with their codes', async () => {
    const bytes = writeDicom({
      rows: 4,
      columns: 4,
      pixels: new Uint16Array(16),
      attributes: CLEAN,
    });
    await expect(
      decodeDicom(bytes.subarray(0, bytes.length - 7)),
    ).rejects.toMatchObject({ code: 'truncated_dicom' });
    await expect(
      decodeDicom(new TextEncoder().encode('name,kvp\nA,70\n'.repeat(20))),
    ).rejects.toMatchObject({ code: 'not_dicom' });
    await expect(decodeDicom(bytes, { frame: 1 })).rejects.toMatchObject({
      code: 'frame_out_of_range',
    });
    await expect(decodeDicom(bytes, { frame: 1 })).rejects.toBeInstanceOf(
      DomainError,
    );
  });

  it('accepts a file without its 128-byte preamble, with a warning', async () => {
    const bytes = writeDicom({
      rows: 4,
      columns: 4,
      pixels: new Uint16Array(16).fill(7),
      attributes: CLEAN,
    });
    const decoded = await decodeDicom(bytes.subarray(132));
    expect(decoded.warnings.map((w) => w.code)).toEqual(['no_part10_header']);
    expect(Array.from(decoded.pixels)).toEqual(new Array(16).fill(7));
  });
});

/** Offset of an explicit-VR element's value, found by walking from the dataset start. */
function findElement(
  bytes: Uint8Array,
  group: number,
  element: number,
): { value: number; length: number } {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let p = 132;
  while (p + 8 <= bytes.length) {
    const g = view.getUint16(p, true);
    const e = view.getUint16(p + 2, true);
    const vr = String.fromCharCode(bytes[p + 4]!, bytes[p + 5]!);
    const long = ['OB', 'OW', 'OF', 'SQ', 'UT', 'UN'].includes(vr);
    const length = long
      ? view.getUint32(p + 8, true)
      : view.getUint16(p + 6, true);
    const value = p + (long ? 12 : 8);
    if (g === group && e === element) return { value, length };
    p = value + length;
  }
  throw new Error(`(${group.toString(16)},${element.toString(16)}) not found`);
}

function setUs(
  bytes: Uint8Array,
  group: number,
  element: number,
  to: number,
): Uint8Array {
  const copy = bytes.slice();
  const { value } = findElement(copy, group, element);
  new DataView(copy.buffer).setUint16(value, to, true);
  return copy;
}

function removeElement(
  bytes: Uint8Array,
  group: number,
  element: number,
): Uint8Array {
  const { value, length } = findElement(bytes, group, element);
  const start = value - 8;
  const out = new Uint8Array(bytes.length - (value + length - start));
  out.set(bytes.subarray(0, start));
  out.set(bytes.subarray(value + length), start);
  return out;
}
