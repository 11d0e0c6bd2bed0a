import type { AnalysisImage } from '../../../server/analysis/analysis-image.ts';
import { decodeDicom } from '../../../server/dicom/decode-dicom.ts';
import { writeDicom } from '../../../server/dicom/write-dicom.ts';
import type { PhantomSpec } from '../../../server/synthetic/phantom-image.ts';
import { renderPhantomImage } from '../../../server/synthetic/phantom-image.ts';
import type { PhantomSessionPlan } from '../../../server/synthetic/phantom-session.ts';
import { phantomAttributes } from '../../../server/synthetic/phantom-session.ts';
import { parseRegionLayout } from '../../../shared/analysis/region-layout.ts';
import type { RegionLayout } from '../../../shared/analysis/region-layout.ts';

/** Grid of the tests: the first two rows of the PHYSICS.md §2 check table. */
export const TEST_GRID = { primaryTransmission: 0.7, scatterTransmission: 0.1 };

/** A 160 × 160 slab with a central contrast disc, linear detector, no offset. */
export function slabSpec(overrides: Partial<PhantomSpec> = {}): PhantomSpec {
  return {
    columns: 160,
    rows: 160,
    seed: 1,
    pixelSpacingMm: 0.2,
    exposureMas: 10,
    primaryKermaUgyPerMas: 0.5,
    scatterToPrimaryRatio: 4,
    grid: null,
    kermaPerQuantumUgy: 0.002,
    object: { cx: 80, cy: 80, radiusPx: 25, primaryContrast: 0.1 },
    response: { model: 'linear', offset: 0, gainPerUgy: 1000 },
    ...overrides,
  };
}

/** Object disc and ring background matching {@link slabSpec}. */
export const SLAB_LAYOUT: RegionLayout = parseRegionLayout({
  name: 'test slab',
  regions: [
    { name: 'disc', role: 'object', spec: 'circle:80,80,22' },
    { name: 'ring', role: 'background', spec: 'ring:80,80,32,60' },
  ],
});

const PLAN: Omit<PhantomSessionPlan, 'exposures'> = {
  stationName: 'SGH-TEST',
  kvp: 81,
  bodyPartThicknessMm: 200,
  sidMm: 1150,
  gridAspectRatio: [12, 1],
  dapDgyCm2PerMas: 0.08,
};

/**
 * Renders a phantom, writes it as DICOM in memory and decodes it again, so
 * the analysis sees exactly what it would see from a file.
 */
export async function decodedPhantom(
  spec: PhantomSpec,
  attributes: Record<string, string | number | number[] | string[]> = {},
  plan: Omit<PhantomSessionPlan, 'exposures'> = PLAN,
): Promise<AnalysisImage> {
  const exposure = { fileName: `seed-${spec.seed}.dcm`, spec, attributes };
  const bytes = writeDicom({
    rows: spec.rows,
    columns: spec.columns,
    pixels: renderPhantomImage(spec),
    attributes: phantomAttributes(
      { ...plan, exposures: [exposure] },
      exposure,
      0,
    ),
  });
  return { ...(await decodeDicom(bytes)), label: exposure.fileName };
}
