import { parseArgs } from 'node:util';
import type { DoseMeasure } from '../../shared/analysis/condition-figures.ts';
import { parseRegionSpec } from '../../shared/roi/region-geometry.ts';
import { readCalibrationFile } from '../analysis/calibration-file.ts';
import type {
  PairComparisonDto,
  PairSideDto,
} from '../analysis/pair-comparison.service.ts';
import { comparePair } from '../analysis/pair-comparison.service.ts';
import { readDicomFile } from '../dicom/decode-dicom.ts';
import type { CommandIo } from './cli-output.ts';
import {
  formatNumber,
  formatTable,
  reportFailure,
  usageError,
} from './cli-output.ts';

/** Help text of `lamella compare`. */
export const COMPARE_USAGE = `Usage:
  lamella compare --grid FILE --no-grid FILE --object SPEC --background SPEC
                  [--dose mas|dap|entrance] [--calibration FILE] [--frame K]
                  [--json]
      Contrast, CNR and SNR of an object against a background in a grid and
      a no-grid image, and the grid figures: contrast improvement factor,
      transmissions per mAs, Bucky factor, SNR improvement factor at equal
      dose (D = mAs unless --dose says otherwise) and dose saving.
      SPEC is circle:CX,CY,R, rect:X0,Y0,W,H, ring:CX,CY,RIN,ROUT or
      polygon:x1,y1;x2,y2;… in pixels, as for lamella measure.
      --calibration FILE: detector calibration JSON
        {"points":[{"airKermaUgy":K,"meanPixelValue":PV},…],"model":"linear"}
        whose inverse turns stored values into air kerma first.
`;

const DOSE_MEASURES: readonly DoseMeasure[] = ['mas', 'dap', 'entrance'];

const format = (value: number | null): string =>
  value === null ? 'n/a' : formatNumber(value);

function sideRows(title: string, side: PairSideDto): string[][] {
  return (['object', 'background'] as const).map((name) => {
    const s = side[name];
    return [
      title,
      name,
      s.roi,
      String(s.n),
      formatNumber(s.mean),
      formatNumber(s.sd),
      formatNumber(s.median),
    ];
  });
}

function textReport(result: PairComparisonDto): string {
  const lines = [
    formatTable(
      ['image', 'region', 'roi', 'n', 'mean', 'sd', 'median'],
      [...sideRows('grid', result.grid), ...sideRows('no grid', result.noGrid)],
    ),
    '',
    formatTable(
      ['image', 'exposure mAs', 'contrast', 'CNR', 'CNR pooled', 'SNR'],
      (
        [
          ['grid', result.grid],
          ['no grid', result.noGrid],
        ] as const
      ).map(([name, side]) => [
        name,
        format(side.exposureMas),
        formatNumber(side.contrast),
        formatNumber(side.cnr),
        formatNumber(side.cnrPooled),
        formatNumber(side.snr),
      ]),
    ),
    '',
    formatTable(
      ['figure', 'value'],
      [
        [
          'contrast improvement factor',
          format(result.contrastImprovementFactor),
        ],
        ['total transmission (per mAs)', format(result.totalTransmission)],
        ['primary transmission (per mAs)', format(result.primaryTransmission)],
        ['Bucky factor', format(result.buckyFactor)],
        [
          'SNR improvement factor at equal dose',
          format(result.snrImprovementFactor),
        ],
        ['dose saving at equal SNR', format(result.doseSaving)],
      ],
    ),
    '',
    'Field values from one image pair; `lamella analyze` gives intervals from replicates.',
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

async function run(
  args: string[],
  io: CommandIo,
  isJson: boolean,
): Promise<void> {
  const { values, positionals } = parseArgs({
    args,
    options: {
      grid: { type: 'string' },
      'no-grid': { type: 'string' },
      object: { type: 'string' },
      background: { type: 'string' },
      dose: { type: 'string' },
      calibration: { type: 'string' },
      frame: { type: 'string' },
      json: { type: 'boolean' },
    },
    allowPositionals: true,
    strict: true,
  });
  if (positionals.length > 0) {
    throw usageError(
      `compare takes no positional argument, got '${positionals[0]}'.`,
    );
  }
  for (const name of ['grid', 'no-grid', 'object', 'background'] as const) {
    if (!values[name]) throw usageError(`compare needs --${name}.`);
  }
  const dose = (values.dose ?? 'mas') as DoseMeasure;
  if (!DOSE_MEASURES.includes(dose)) {
    throw usageError(
      `--dose must be mas, dap or entrance, not '${values.dose}'.`,
    );
  }
  const frame = values.frame === undefined ? 0 : Number(values.frame);
  if (!/^\d+$/.test(values.frame ?? '0')) {
    throw usageError(
      `--frame needs a whole number counted from 0, not '${values.frame}'.`,
    );
  }
  const object = {
    region: parseRegionSpec(values.object!),
    spec: values.object!,
  };
  const background = {
    region: parseRegionSpec(values.background!),
    spec: values.background!,
  };
  const calibration = values.calibration
    ? (await readCalibrationFile(values.calibration)).chosen
    : null;
  const [gridImage, noGridImage] = await Promise.all([
    readDicomFile(values.grid!, { frame }),
    readDicomFile(values['no-grid']!, { frame }),
  ]);
  const result = comparePair({
    gridImage: { ...gridImage, label: values.grid! },
    noGridImage: { ...noGridImage, label: values['no-grid']! },
    object,
    background,
    doseMeasure: dose,
    calibration,
  });
  io.stdout(isJson ? `${JSON.stringify(result)}\n` : textReport(result));
}

/**
 * Runs `lamella compare …`.
 * @param args the arguments after `compare`.
 * @param io output sinks.
 * @returns the exit code: 0, or 2 for any error (one line on stderr; with
 *   --json also `{"error":{"code","message"}}` on stdout).
 */
export async function runCompareCommand(
  args: string[],
  io: CommandIo,
): Promise<number> {
  const isJson = args.includes('--json');
  if (args.includes('--help') || args.includes('-h')) {
    io.stdout(COMPARE_USAGE);
    return 0;
  }
  try {
    await run(args, io, isJson);
    return 0;
  } catch (error) {
    return reportFailure('compare', error, isJson, io);
  }
}
