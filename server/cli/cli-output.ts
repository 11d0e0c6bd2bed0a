import { DomainError } from '../../shared/errors.ts';

/** Where a command writes: the real streams in the bin, buffers in tests. */
export interface CommandIo {
  stdout: (text: string) => void;
  stderr: (text: string) => void;
}

/** One `lamella` subcommand: its arguments after the name, exit code back. */
export type Command = (args: string[], io: CommandIo) => Promise<number>;

/** A usage error (bad flags or arguments), reported with code `usage`. */
export function usageError(message: string): DomainError {
  return new DomainError('usage', message);
}

function isParseArgsError(error: unknown): error is Error {
  const code = (error as { code?: unknown } | null)?.code;
  return typeof code === 'string' && code.startsWith('ERR_PARSE_ARGS');
}

/**
 * Reports a failure the way every `lamella` command does: a one-line reason
 * on stderr, with --json also `{"error":{"code","message"}}` on stdout, and
 * exit status 2. Never prints a stack trace.
 */
export function reportFailure(
  command: string,
  error: unknown,
  isJson: boolean,
  io: CommandIo,
): number {
  const failure =
    error instanceof DomainError
      ? error
      : isParseArgsError(error)
        ? usageError(error.message)
        : new DomainError(
            'internal_error',
            `Unexpected failure: ${error instanceof Error ? error.message : String(error)}`,
          );
  const line = failure.message.replace(/\s*\n\s*/g, ' ');
  io.stderr(`lamella ${command}: ${line}\n`);
  if (isJson) {
    io.stdout(
      `${JSON.stringify({ error: { code: failure.code, message: line } })}\n`,
    );
  }
  return 2;
}

/** Formats a number for people: up to 6 significant digits, no exponent for usual sizes. */
export function formatNumber(value: number): string {
  if (Number.isInteger(value)) return String(value);
  const abs = Math.abs(value);
  if (abs !== 0 && (abs < 1e-3 || abs >= 1e9)) return value.toExponential(5);
  return String(Number(value.toPrecision(6)));
}

/** Left-aligned text table with a header row. */
export function formatTable(header: string[], rows: string[][]): string {
  const widths = header.map((h, i) =>
    Math.max(h.length, ...rows.map((r) => (r[i] ?? '').length)),
  );
  const line = (cells: string[]): string =>
    cells
      .map((c, i) => c.padEnd(widths[i]!))
      .join('  ')
      .trimEnd();
  return [line(header), ...rows.map(line)].join('\n');
}
