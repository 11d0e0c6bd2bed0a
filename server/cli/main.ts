import { runAnalyzeCommand } from './analyze.command.ts';
import type { Command, CommandIo } from './cli-output.ts';
import { reportFailure, usageError } from './cli-output.ts';
import { runCompareCommand } from './compare.command.ts';
import { runGeometryCommand } from './geometry.command.ts';
import { runInspectCommand } from './inspect.command.ts';
import { runMeasureCommand } from './measure.command.ts';

/** The `lamella` subcommands: add a command with one line here. */
const COMMANDS: Record<string, { summary: string; run: Command }> = {
  inspect: {
    summary:
      'decoded facts, acquisition data and trust warnings of a DICOM file',
    run: runInspectCommand,
  },
  measure: {
    summary:
      'ROI statistics of a DICOM image (--roi circle:CX,CY,R | rect:X0,Y0,W,H)',
    run: runMeasureCommand,
  },
  geometry: {
    summary: 'focused-grid cut-off, focusing range and predicted transmissions',
    run: runGeometryCommand,
  },
  compare: {
    summary:
      'grid vs no-grid figures of one image pair (--grid FILE --no-grid FILE --object SPEC --background SPEC)',
    run: runCompareCommand,
  },
  analyze: {
    summary:
      'every grid figure with its interval for a folder of images and a region layout',
    run: runAnalyzeCommand,
  },
};

function usage(): string {
  const width = Math.max(...Object.keys(COMMANDS).map((name) => name.length));
  return [
    'Usage: lamella COMMAND [options]   (lamella COMMAND --help for details)',
    '',
    ...Object.entries(COMMANDS).map(
      ([name, c]) => `  ${name.padEnd(width)}  ${c.summary}`,
    ),
    '',
  ].join('\n');
}

const processIo: CommandIo = {
  stdout: (text) => process.stdout.write(text),
  stderr: (text) => process.stderr.write(text),
};

/**
 * Runs `lamella` with the arguments after the program name.
 * @returns the exit code: 0, or 2 for a usage error or a failed command.
 */
export async function main(
  argv: string[],
  io: CommandIo = processIo,
): Promise<number> {
  const [name, ...rest] = argv;
  if (
    name === undefined ||
    name === '--help' ||
    name === '-h' ||
    name === 'help'
  ) {
    io.stdout(usage());
    return name === undefined ? 2 : 0;
  }
  const command = COMMANDS[name];
  if (!command) {
    return reportFailure(
      name,
      usageError(
        `'${name}' is not a lamella command; try ${Object.keys(COMMANDS).join(', ')}.`,
      ),
      argv.includes('--json'),
      io,
    );
  }
  return command.run(rest, io);
}
