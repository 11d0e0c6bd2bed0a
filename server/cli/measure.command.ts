import { parseArgs } from 'node:util';
import { parseRegionSpec } from '../../shared/roi/region-geometry.ts';
import { regionStatistics } from '../../shared/roi/region-statistics.ts';
import type { Warning } from '../../shared/warnings.ts';
import { readDicomFile } from '../dicom/decode-dicom.ts';
import type { CommandIo } from './cli-output.ts';
import {
  formatNumber,
  formatTable,
  reportFailure,
  usageError,
} from './cli-output.ts';

/** Help text of `lamella measure`. */
export const MEASURE_USAGE = `Usage: lamella measure FILE --roi SPEC [--roi SPEC …] [--frame K] [--json]
  SPEC is circle:CX,CY,R | rect:X0,Y0,W,H | ring:CX,CY,RIN,ROUT |
  polygon:X1,Y1;X2,Y2;… in pixels. x is the column and y the row, from 0 at
  the top-left pixel; pixel (x,y) covers [x,x+1)×[y,y+1), so its centre is
  (x+0.5, y+0.5). A circle holds the pixels whose centre lies within R of
  (CX,CY); a rect holds X0 ≤ x < X0+W and Y0 ≤ y < Y0+H.
  Values are modality values (masked to Bits Stored, sign-extended, rescaled).
  sd is the sample SD (n−1), sdPopulation the population SD (n).
  --frame K picks frame K of a multi-frame image, counted from 0.
`;

/** One ROI row of the JSON contract. */
export interface MeasureRoiJson {
  roi: string;
  n: number;
  mean: number;
  sd: number;
  sdPopulation: number;
  min: number;
  max: number;
  median: number;
}

/** The JSON object `lamella measure --json` prints. */
export interface MeasureJson {
  file: string;
  rows: number;
  columns: number;
  frames: number;
  transferSyntaxUid: string;
  photometricInterpretation: string;
  warnings: Warning[];
  rois: MeasureRoiJson[];
}

function parseFrame(text: string | undefined): number | undefined {
  if (text === undefined) return undefined;
  if (!/^\d+$/.test(text)) {
    throw usageError(
      `--frame needs a whole number counted from 0, not '${text}'.`,
    );
  }
  return Number(text);
}

/**
 * Runs `lamella measure FILE --roi SPEC… [--frame K] [--json]`.
 * @returns 0, or 2 when the file cannot be measured or the arguments are wrong.
 */
export async function runMeasureCommand(
  args: string[],
  io: CommandIo,
): Promise<number> {
  const isJson = args.includes('--json');
  if (args.includes('--help') || args.includes('-h')) {
    io.stdout(MEASURE_USAGE);
    return 0;
  }
  try {
    const { values, positionals } = parseArgs({
      args,
      allowPositionals: true,
      options: {
        roi: { type: 'string', multiple: true },
        frame: { type: 'string' },
        json: { type: 'boolean' },
      },
    });
    if (positionals.length !== 1) {
      throw usageError(
        `measure takes one FILE, got ${positionals.length}. ${MEASURE_USAGE.split('\n')[0]}`,
      );
    }
    const specs = values.roi ?? [];
    if (specs.length === 0)
      throw usageError('measure needs at least one --roi SPEC.');
    const regions = specs.map((spec) => parseRegionSpec(spec));
    const file = positionals[0]!;
    const image = await readDicomFile(file, {
      frame: parseFrame(values.frame),
    });
    const warnings: Warning[] = [...image.warnings];
    const rois: MeasureRoiJson[] = regions.map((region, i) => {
      const { stats, warnings: roiWarnings } = regionStatistics(
        image.pixels,
        image.columns,
        image.rows,
        region,
      );
      for (const w of roiWarnings) {
        warnings.push({
          code: w.code,
          message: `ROI ${specs[i]}: ${w.message}`,
        });
      }
      return {
        roi: specs[i]!,
        n: stats.n,
        mean: stats.mean,
        sd: stats.sampleSd,
        sdPopulation: stats.populationSd,
        min: stats.min,
        max: stats.max,
        median: stats.median,
      };
    });
    const result: MeasureJson = {
      file,
      rows: image.rows,
      columns: image.columns,
      frames: image.frames,
      transferSyntaxUid: image.transferSyntaxUid,
      photometricInterpretation: image.photometricInterpretation,
      warnings,
      rois,
    };
    io.stdout(
      isJson
        ? `${JSON.stringify(result)}\n`
        : formatMeasure(result, image.frame),
    );
    return 0;
  } catch (error) {
    return reportFailure('measure', error, isJson, io);
  }
}

function formatMeasure(result: MeasureJson, frame: number): string {
  const lines = [
    `${result.file}: ${result.columns} × ${result.rows}, frame ${frame} of ${result.frames}, ${result.photometricInterpretation}, ${result.transferSyntaxUid}`,
    '',
    formatTable(
      ['roi', 'n', 'mean', 'sd', 'sdPopulation', 'min', 'max', 'median'],
      result.rois.map((r) => [
        r.roi,
        String(r.n),
        formatNumber(r.mean),
        formatNumber(r.sd),
        formatNumber(r.sdPopulation),
        formatNumber(r.min),
        formatNumber(r.max),
        formatNumber(r.median),
      ]),
    ),
  ];
  if (result.warnings.length > 0) {
    lines.push(
      '',
      'Warnings:',
      ...result.warnings.map((w) => `  ${w.code}: ${w.message}`),
    );
  }
  return `${lines.join('\n')}\n`;
}
