import { DomainError } from '../errors.ts';
import type { RegionSpans } from '../roi/region-mask.ts';
import { regionSpans } from '../roi/region-mask.ts';
import type {
  PixelArray,
  RegionStatistics,
  SignalLookupTable,
} from '../roi/region-statistics.ts';
import { spanStatistics } from '../roi/region-statistics.ts';
import type { Warning } from '../warnings.ts';
import type { BackgroundPlane } from './background-plane.ts';
import {
  fitBackgroundPlane,
  planeSignalAt,
  planeStandardErrorAt,
  spansCentroid,
} from './background-plane.ts';
import type { BeamStopFit } from './beam-stop.ts';
import { fitBeamStop } from './beam-stop.ts';
import type {
  CnrDefinition,
  ImageFigureOptions,
  ImageFigures,
  NoiseMeasure,
  RegionSignal,
} from './image-figures.ts';
import { imageFigures } from './image-figures.ts';
import type { ResolvedLayout } from './region-layout.ts';
import { replicateNoise } from './replicate-noise.ts';

/** Background trend removal. */
export type Detrend = 'none' | 'plane';

/** Options of {@link measureLayout}. */
export interface LayoutMeasurementOptions {
  cnrDefinition: CnrDefinition;
  detrend: Detrend;
  /**
   * A replicate of the same set-up (same size and signal domain): noise is
   * then taken from the difference image ÷ √2.
   */
  replicatePixels?: PixelArray | null;
}

/** Statistics of one named region. */
export interface RegionMeasurement {
  name: string;
  role: 'object' | 'background' | 'beam-stop';
  stats: RegionStatistics;
}

/** Noise of a region from the difference with a replicate. */
export interface DifferenceNoise {
  n: number;
  /** SD of the difference image ÷ √2. */
  sampleSd: number;
}

/** An object with its background(s) on one image. */
export interface ObjectMeasurement {
  name: string;
  backgrounds: string[];
  object: RegionSignal;
  /** The background regions taken together (their union). */
  background: RegionSignal;
  /** Plane fitted over the backgrounds, when detrending. */
  plane: BackgroundPlane | null;
  /** Background noise from the replicate difference, when a replicate was given. */
  differenceNoise: DifferenceNoise | null;
  figures: ImageFigures;
}

/** Every measurement of a layout on one image. */
export interface LayoutMeasurement {
  regions: RegionMeasurement[];
  objects: ObjectMeasurement[];
  beamStop: BeamStopFit | null;
  warnings: Warning[];
}

/**
 * Mean and sample SD of the union of disjoint groups from their own counts,
 * means and SDs: SS = Σ[(nᵢ − 1)sᵢ² + nᵢ(mᵢ − m)²].
 */
export function poolRegionSignals(
  parts: readonly RegionSignal[],
): RegionSignal {
  const n = parts.reduce((s, p) => s + p.n, 0);
  const mean = parts.reduce((s, p) => s + p.n * p.mean, 0) / n;
  const ss = parts.reduce(
    (s, p) => s + (p.n - 1) * p.sampleSd ** 2 + p.n * (p.mean - mean) ** 2,
    0,
  );
  return { n, mean, sampleSd: n > 1 ? Math.sqrt(ss / (n - 1)) : 0 };
}

function differenceNoise(
  pixels: PixelArray,
  replicate: PixelArray,
  columns: number,
  spans: readonly RegionSpans[],
  lut: SignalLookupTable | null,
): DifferenceNoise {
  const parts = spans.map((s) => {
    const d = replicateNoise(pixels, replicate, columns, s, lut ?? undefined);
    return { n: d.n, mean: d.meanDifference, sampleSd: d.differenceSampleSd };
  });
  const pooled = poolRegionSignals(parts);
  return { n: pooled.n, sampleSd: pooled.sampleSd / Math.SQRT2 };
}

/**
 * Measures a layout on one image in its signal domain: statistics of every
 * region, then per object its figures against the union of its background
 * regions — with the noise from a replicate difference when given, else the
 * SD about a background plane when detrending, else the background SD; and
 * with detrending the background level is the plane at the object's
 * centroid. Lead-disc shadows give a beam-stop fit against the backgrounds.
 * @param pixels row-major image.
 * @param columns image width; rows image height, in pixels.
 * @param layout regions in pixels.
 * @param lut linearisation table, or null for the stored values.
 * @returns measurements and warnings (clipped regions, named).
 * @throws DomainError('region_empty') for a region outside the image;
 *   DomainError('analysis_failed') when a figure is undefined.
 */
export function measureLayout(
  pixels: PixelArray,
  columns: number,
  rows: number,
  layout: ResolvedLayout,
  lut: SignalLookupTable | null,
  options: LayoutMeasurementOptions,
): LayoutMeasurement {
  const warnings: Warning[] = [];
  const spansByName = new Map<string, RegionSpans>();
  const regions: RegionMeasurement[] = [];
  const measure = (
    name: string,
    role: RegionMeasurement['role'],
    region: Parameters<typeof regionSpans>[0],
  ): RegionStatistics => {
    const spans = regionSpans(region, columns, rows);
    if (spans.pixelCount === 0) {
      throw new DomainError(
        'region_empty',
        `Region '${name}' holds no pixel of the ${columns} × ${rows} image.`,
      );
    }
    if (spans.clipped) {
      warnings.push({
        code: 'region_clipped',
        message: `Part of region '${name}' lies outside the image; only its ${spans.pixelCount} pixels inside were measured.`,
      });
    }
    const result = spanStatistics(pixels, columns, spans, {
      lut: lut ?? undefined,
    });
    for (const w of result.warnings) {
      warnings.push({
        code: w.code,
        message: `Region '${name}': ${w.message}`,
      });
    }
    spansByName.set(name, spans);
    regions.push({ name, role, stats: result.stats });
    return result.stats;
  };
  const backgroundStats = new Map<string, RegionStatistics>();
  for (const b of layout.backgrounds) {
    backgroundStats.set(b.name, measure(b.name, 'background', b.region));
  }
  const replicate = options.replicatePixels ?? null;
  const objects = layout.objects.map((o): ObjectMeasurement => {
    const objectStats = measure(o.name, 'object', o.region);
    const backgroundSpans = o.backgrounds.map((name) => spansByName.get(name)!);
    const background = poolRegionSignals(
      o.backgrounds.map((name) => backgroundStats.get(name)!),
    );
    const figureOptions: ImageFigureOptions = {
      cnrDefinition: options.cnrDefinition,
    };
    let plane: BackgroundPlane | null = null;
    if (options.detrend === 'plane') {
      plane = fitBackgroundPlane(
        pixels,
        columns,
        backgroundSpans,
        lut ?? undefined,
      );
      const centre = spansCentroid(spansByName.get(o.name)!);
      figureOptions.backgroundLevel = {
        value: planeSignalAt(plane, centre.xPx, centre.yPx),
        standardError: planeStandardErrorAt(plane, centre.xPx, centre.yPx),
      };
      figureOptions.backgroundNoise = {
        sampleSd: plane.sampleSdAboutPlane,
        degreesOfFreedom: plane.n - 3,
        source: 'sd-about-background-plane',
      };
    }
    let noise: DifferenceNoise | null = null;
    if (replicate) {
      noise = differenceNoise(pixels, replicate, columns, backgroundSpans, lut);
      const objectNoise = differenceNoise(
        pixels,
        replicate,
        columns,
        [spansByName.get(o.name)!],
        lut,
      );
      const asMeasure = (d: DifferenceNoise): NoiseMeasure => ({
        sampleSd: d.sampleSd,
        degreesOfFreedom: d.n - 1,
        source: 'replicate-difference',
      });
      figureOptions.backgroundNoise = asMeasure(noise);
      figureOptions.objectNoise = asMeasure(objectNoise);
    }
    return {
      name: o.name,
      backgrounds: o.backgrounds,
      object: objectStats,
      background,
      plane,
      differenceNoise: noise,
      figures: imageFigures(objectStats, background, figureOptions),
    };
  });
  let beamStop: BeamStopFit | null = null;
  if (layout.beamStops.length > 0) {
    const discs = layout.beamStops.map((b) => ({
      diameterMm: b.diameterMm,
      signal: measure(b.name, 'beam-stop', b.region),
    }));
    beamStop = fitBeamStop(
      discs,
      poolRegionSignals([...backgroundStats.values()]),
    );
    warnings.push(...beamStop.warnings);
  }
  return { regions, objects, beamStop, warnings };
}
