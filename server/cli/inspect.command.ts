import { parseArgs } from 'node:util';
import { transferSyntaxName } from '../../shared/dicom/transfer-syntaxes.ts';
import type { DecodedImage } from '../dicom/decode-dicom.ts';
import { readDicomFile } from '../dicom/decode-dicom.ts';
import type { CommandIo } from './cli-output.ts';
import { formatNumber, reportFailure, usageError } from './cli-output.ts';

/** Help text of `lamella inspect`. */
export const INSPECT_USAGE = `Usage: lamella inspect FILE [--frame K] [--json]
  Decodes FILE and prints the image facts, the acquisition data and the trust
  warnings; --json adds the whole header (no bulk or patient data).
`;

/** Everything `inspect --json` prints, pixels left out. */
export type InspectJson = Omit<DecodedImage, 'pixels'> & {
  file: string;
  transferSyntaxName: string;
};

/**
 * Runs `lamella inspect FILE [--frame K] [--json]`.
 * @returns 0, or 2 when the file cannot be decoded or the arguments are wrong.
 */
export async function runInspectCommand(
  args: string[],
  io: CommandIo,
): Promise<number> {
  const isJson = args.includes('--json');
  if (args.includes('--help') || args.includes('-h')) {
    io.stdout(INSPECT_USAGE);
    return 0;
  }
  try {
    const { values, positionals } = parseArgs({
      args,
      allowPositionals: true,
      options: { json: { type: 'boolean' }, frame: { type: 'string' } },
    });
    if (positionals.length !== 1) {
      throw usageError(`inspect takes one FILE, got ${positionals.length}.`);
    }
    if (values.frame !== undefined && !/^\d+$/.test(values.frame)) {
      throw usageError(
        `--frame needs a whole number counted from 0, not '${values.frame}'.`,
      );
    }
    const file = positionals[0]!;
    const image = await readDicomFile(file, {
      frame: values.frame === undefined ? undefined : Number(values.frame),
    });
    const { pixels: _pixels, ...facts } = image;
    const result: InspectJson = {
      file,
      transferSyntaxName: transferSyntaxName(image.transferSyntaxUid),
      ...facts,
    };
    io.stdout(isJson ? `${JSON.stringify(result)}\n` : formatInspect(result));
    return 0;
  } catch (error) {
    return reportFailure('inspect', error, isJson, io);
  }
}

function show(value: unknown): string {
  if (typeof value === 'number') return formatNumber(value);
  if (Array.isArray(value)) return value.map(show).join(' \\ ');
  if (value !== null && typeof value === 'object') {
    return Object.entries(value)
      .map(([k, v]) => `${k} ${show(v)}`)
      .join(', ');
  }
  return String(value);
}

function formatInspect(r: InspectJson): string {
  const lines = [
    r.file,
    `  image        ${r.columns} × ${r.rows}, ${r.frames} frame(s), ${r.photometricInterpretation}`,
    `  syntax       ${r.transferSyntaxName} (${r.transferSyntaxUid})`,
    `  bits         allocated ${r.bitsAllocated}, stored ${r.bitsStored}, high bit ${r.highBit}, ${r.pixelRepresentation === 1 ? 'signed' : 'unsigned'}`,
    `  rescale      slope ${formatNumber(r.rescaleSlope)}, intercept ${formatNumber(r.rescaleIntercept)}`,
    `  spacing      ${r.pixelSpacing ? `${formatNumber(r.pixelSpacing.rowMm)} × ${formatNumber(r.pixelSpacing.columnMm)} mm (row × column, ${r.pixelSpacing.source})` : 'none'}`,
    '',
    'Acquisition:',
  ];
  for (const [key, value] of Object.entries(r.acquisition)) {
    if (value !== null) lines.push(`  ${key.padEnd(30)} ${show(value)}`);
  }
  lines.push('', r.warnings.length > 0 ? 'Warnings:' : 'Warnings: none');
  for (const w of r.warnings) lines.push(`  ${w.code}: ${w.message}`);
  return `${lines.join('\n')}\n`;
}
