import { readFile, readdir, stat } from 'node:fs/promises';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { stringify } from 'csv-stringify/sync';
import type { DoseMeasure } from '../../shared/analysis/condition-figures.ts';
import type { CnrDefinition } from '../../shared/analysis/image-figures.ts';
import type { Detrend } from '../../shared/analysis/layout-measurement.ts';
import type { RegionLayout } from '../../shared/analysis/region-layout.ts';
import { parseRegionLayout } from '../../shared/analysis/region-layout.ts';
import { DomainError } from '../../shared/errors.ts';
import type { ErrorCode } from '../../shared/errors.ts';
import type { AnalysisImage } from '../analysis/analysis-image.ts';
import { readCalibrationFile } from '../analysis/calibration-file.ts';
import type {
  AnalysisOptions,
  ConditionAnalysis,
} from '../analysis/condition-analysis.service.ts';
import { analyseCondition } from '../analysis/condition-analysis.service.ts';
import type {
  ConditionKey,
  UnassignedImage,
} from '../analysis/condition-grouping.service.ts';
import { formConditions } from '../analysis/condition-grouping.service.ts';
import { figureRows } from '../analysis/figure-rows.ts';
import { readDicomFile } from '../dicom/decode-dicom.ts';
import type { CommandIo } from './cli-output.ts';
import {
  formatNumber,
  formatTable,
  reportFailure,
  usageError,
} from './cli-output.ts';

/** Help text of `lamella analyze`. */
export const ANALYZE_USAGE = `Usage:
  lamella analyze FOLDER --layout FILE [--json | --csv]
                  [--dose mas|dap|entrance] [--cnr background-sd|pooled-sd]
                  [--detrend none|plane] [--noise region|replicate-difference]
                  [--calibration FILE] [--scatter-transmission TS]
      Reads every DICOM file in FOLDER (and its subfolders), forms grid and
      no-grid conditions with their replicates from the headers (Grid,
      kV, exposure, Station Name, Body Part Thickness), applies the region
      layout (JSON: named regions with role object, background or
      beam-stop; see fixtures/layouts/README.md) and prints every figure
      with its 95 % interval, the verdict at equal dose and the method.
      --detrend plane: background SD about a least-squares plane (heel effect).
      --noise replicate-difference: noise from the difference of replicates ÷ √2.
      --calibration FILE: detector calibration JSON (see lamella compare --help).
      --scatter-transmission TS: Ts stated for the grid, when no beam stop was used.
`;

/** One formed condition in the JSON output. */
export interface AnalyzeConditionJson {
  key: ConditionKey;
  grid: {
    grid: string[];
    gridId: string | null;
    exposureMas: number | null;
    files: string[];
  };
  noGrid: { exposureMas: number | null; files: string[] };
  analysis: ConditionAnalysis | null;
  error: { code: ErrorCode; message: string } | null;
}

/** The JSON object `lamella analyze --json` prints. */
export interface AnalyzeJson {
  folder: string;
  layout: string;
  images: number;
  conditions: AnalyzeConditionJson[];
  unassigned: UnassignedImage[];
  skipped: Array<{ file: string; code: string; message: string }>;
}

const choices = <T extends string>(
  flag: string,
  value: string | undefined,
  allowed: readonly T[],
  fallback: T,
): T => {
  if (value === undefined) return fallback;
  if (!allowed.includes(value as T)) {
    throw usageError(
      `--${flag} must be ${allowed.join(' or ')}, not '${value}'.`,
    );
  }
  return value as T;
};

async function listFiles(folder: string): Promise<string[]> {
  let info;
  try {
    info = await stat(folder);
  } catch {
    throw new DomainError('file_unreadable', `No such folder: ${folder}.`);
  }
  if (!info.isDirectory()) {
    throw new DomainError('file_unreadable', `${folder} is not a folder.`);
  }
  const entries = await readdir(folder, {
    recursive: true,
    withFileTypes: true,
  });
  return entries
    .filter((e) => e.isFile() && !e.name.startsWith('.'))
    .map((e) => path.join(e.parentPath, e.name))
    .sort();
}

async function readLayout(file: string): Promise<RegionLayout> {
  let text: string;
  try {
    text = await readFile(file, 'utf8');
  } catch {
    throw new DomainError(
      'file_unreadable',
      `Cannot read the layout file ${file}.`,
    );
  }
  try {
    return parseRegionLayout(JSON.parse(text));
  } catch (error) {
    if (error instanceof SyntaxError) {
      throw new DomainError('validation_failed', `${file} is not valid JSON.`);
    }
    throw error;
  }
}

function interval(e: {
  value: number;
  ci95: { low: number; high: number };
}): string {
  return `${formatNumber(e.value)} [${formatNumber(e.ci95.low)}, ${formatNumber(e.ci95.high)}]`;
}

function textReport(result: AnalyzeJson): string {
  const lines = [
    `${result.folder}: ${result.images} images, layout '${result.layout}', ${result.conditions.length} condition(s).`,
  ];
  for (const c of result.conditions) {
    lines.push(
      '',
      `Station ${c.key.stationName ?? '?'}, ${c.key.kvp ?? '?'} kV, ${c.key.bodyPartThicknessMm ?? '?'} mm: grid ${c.grid.grid.join('\\')} ${c.grid.exposureMas ?? '?'} mAs (${c.grid.files.length} image(s)) vs no grid ${c.noGrid.exposureMas ?? '?'} mAs (${c.noGrid.files.length} image(s))`,
    );
    if (!c.analysis) {
      lines.push(`  not analysed: ${c.error?.code}: ${c.error?.message}`);
      continue;
    }
    const rows = figureRows(c.analysis);
    for (const o of c.analysis.objects) {
      lines.push(
        `  Object '${o.name}' against ${o.backgrounds.join(', ')}:`,
        formatTable(
          ['figure', 'value [95 % CI]', 'SE', 'basis'],
          rows
            .filter((r) => r.object === o.name)
            .map((r) => [
              r.figure,
              interval({
                value: r.value,
                ci95: { low: r.ciLow, high: r.ciHigh },
              }),
              formatNumber(r.standardError),
              r.basis,
            ]),
        )
          .split('\n')
          .map((line) => `    ${line}`)
          .join('\n'),
      );
      if (o.figures.verdict) lines.push(`  ${o.figures.verdict.sentence}`);
      for (const w of o.figures.warnings)
        lines.push(`  Warning (${w.code}): ${w.message}`);
    }
    const m = c.analysis.method;
    lines.push(
      `  Method: signal ${m.signal.join('; ')}; ${m.cnr}; noise ${m.noise}; detrend ${m.detrend}; D = ${m.doseLabel}; ${m.uncertainty}.`,
    );
    if (c.analysis.legacyConversion) {
      const l = c.analysis.legacyConversion;
      lines.push(
        `  Legacy (${l.table}): a ${l.gridRatio}:1 grid would have asked ${formatNumber(l.legacyGridExposureMas)} mAs for ${formatNumber(l.noGridExposureMas)} mAs without grid. ${l.note}`,
      );
    }
    const imageWarnings = [
      ...c.analysis.images.grid,
      ...c.analysis.images.noGrid,
    ].flatMap((image) =>
      image.warnings.map(
        (w) => `  ${path.basename(image.label)}: ${w.code}: ${w.message}`,
      ),
    );
    lines.push(
      ...c.analysis.warnings.map((w) => `  Warning (${w.code}): ${w.message}`),
    );
    if (imageWarnings.length > 0)
      lines.push('  Image warnings:', ...imageWarnings.map((l) => `  ${l}`));
  }
  for (const u of result.unassigned)
    lines.push(`Not used: ${u.label}: ${u.reason}`);
  for (const s of result.skipped)
    lines.push(`Skipped: ${s.file}: ${s.code}: ${s.message}`);
  lines.push(
    '',
    'Field values from phantom images, not IEC 60627 stated values; review and sign-off by a qualified medical physicist.',
  );
  return `${lines.join('\n')}\n`;
}

function csvReport(result: AnalyzeJson): string {
  const rows = result.conditions.flatMap((c) =>
    c.analysis ? figureRows(c.analysis) : [],
  );
  return stringify(
    rows.map((r) => ({ ...r, degreesOfFreedom: r.degreesOfFreedom ?? '' })),
    {
      header: true,
      columns: [
        'station',
        'kvp',
        'thicknessMm',
        'grid',
        'gridExposureMas',
        'noGridExposureMas',
        'object',
        'figure',
        'value',
        'standardError',
        'ciLow',
        'ciHigh',
        'degreesOfFreedom',
        'basis',
        'images',
      ],
    },
  );
}

async function run(
  args: string[],
): Promise<{ result: AnalyzeJson; format: 'json' | 'csv' | 'text' }> {
  const { values, positionals } = parseArgs({
    args,
    allowPositionals: true,
    options: {
      layout: { type: 'string' },
      json: { type: 'boolean' },
      csv: { type: 'boolean' },
      dose: { type: 'string' },
      cnr: { type: 'string' },
      detrend: { type: 'string' },
      noise: { type: 'string' },
      calibration: { type: 'string' },
      'scatter-transmission': { type: 'string' },
    },
  });
  if (positionals.length !== 1) {
    throw usageError(
      `analyze takes one FOLDER, got ${positionals.length}. ${ANALYZE_USAGE.split('\n')[1]!.trim()}`,
    );
  }
  if (!values.layout) throw usageError('analyze needs --layout FILE.');
  if (values.json && values.csv)
    throw usageError('Choose one of --json and --csv.');
  let statedTs: number | null = null;
  if (values['scatter-transmission'] !== undefined) {
    statedTs = Number(values['scatter-transmission']);
    if (!(statedTs > 0 && statedTs <= 1)) {
      throw usageError('--scatter-transmission must be a number in (0, 1].');
    }
  }
  const options: AnalysisOptions = {
    doseMeasure: choices<DoseMeasure>(
      'dose',
      values.dose,
      ['mas', 'dap', 'entrance'],
      'mas',
    ),
    cnrDefinition: choices<CnrDefinition>(
      'cnr',
      values.cnr,
      ['background-sd', 'pooled-sd'],
      'background-sd',
    ),
    detrend: choices<Detrend>(
      'detrend',
      values.detrend,
      ['none', 'plane'],
      'none',
    ),
    noise: choices(
      'noise',
      values.noise,
      ['region', 'replicate-difference'] as const,
      'region',
    ),
    calibration: values.calibration
      ? (await readCalibrationFile(values.calibration)).chosen
      : null,
    statedScatterTransmission: statedTs,
  };
  const layout = await readLayout(values.layout);
  const folder = positionals[0]!;
  const files = await listFiles(folder);
  const images: AnalysisImage[] = [];
  const skipped: AnalyzeJson['skipped'] = [];
  for (const file of files) {
    try {
      images.push({ ...(await readDicomFile(file)), label: file });
    } catch (error) {
      if (!(error instanceof DomainError)) throw error;
      skipped.push({ file, code: error.code, message: error.message });
    }
  }
  const { conditions, unassigned } = formConditions(images);
  if (conditions.length === 0) {
    const why = [
      ...unassigned.map((u) => u.reason),
      ...skipped.map((s) => s.message),
    ];
    throw new DomainError(
      'analysis_failed',
      `No grid/no-grid condition could be formed from ${files.length} file(s) in ${folder}${why.length > 0 ? `: ${[...new Set(why)].join(' ')}` : '.'}`,
    );
  }
  const result: AnalyzeJson = {
    folder,
    layout: layout.name,
    images: images.length,
    conditions: conditions.map((c) => {
      const entry: AnalyzeConditionJson = {
        key: c.key,
        grid: {
          grid: c.grid.grid,
          gridId: c.grid.gridId,
          exposureMas: c.grid.exposureMas,
          files: c.grid.images.map((i) => i.label),
        },
        noGrid: {
          exposureMas: c.noGrid.exposureMas,
          files: c.noGrid.images.map((i) => i.label),
        },
        analysis: null,
        error: null,
      };
      try {
        entry.analysis = analyseCondition({
          gridImages: c.grid.images,
          noGridImages: c.noGrid.images,
          layout,
          options,
        });
      } catch (error) {
        if (!(error instanceof DomainError)) throw error;
        entry.error = { code: error.code, message: error.message };
      }
      return entry;
    }),
    unassigned,
    skipped,
  };
  if (result.conditions.every((c) => c.analysis === null)) {
    const first = result.conditions[0]!.error!;
    throw new DomainError(
      first.code,
      `No condition could be analysed: ${first.message}`,
    );
  }
  return { result, format: values.json ? 'json' : values.csv ? 'csv' : 'text' };
}

/**
 * Runs `lamella analyze FOLDER --layout FILE …`.
 * @returns 0, or 2 when nothing could be analysed or the arguments are wrong
 *   (one line on stderr; with --json also `{"error":{"code","message"}}`).
 */
export async function runAnalyzeCommand(
  args: string[],
  io: CommandIo,
): Promise<number> {
  const isJson = args.includes('--json');
  if (args.includes('--help') || args.includes('-h')) {
    io.stdout(ANALYZE_USAGE);
    return 0;
  }
  try {
    const { result, format } = await run(args);
    io.stdout(
      format === 'json'
        ? `${JSON.stringify(result)}\n`
        : format === 'csv'
          ? csvReport(result)
          : textReport(result),
    );
    return 0;
  } catch (error) {
    return reportFailure('analyze', error, isJson, io);
  }
}
