import type { Warning } from '../../../../shared/warnings.ts';

/** Warnings beside a result, amber, each with its code for reference. */
export function WarningList({
  warnings,
  testId,
}: {
  warnings: readonly Warning[];
  testId?: string;
}) {
  if (warnings.length === 0) return null;
  return (
    <ul
      role="alert"
      data-testid={testId}
      className="space-y-2 rounded-lg border border-caution-500/40 bg-caution-50 p-4 text-sm text-caution-900"
    >
      {warnings.map((warning) => (
        <li key={`${warning.code}:${warning.message}`} data-code={warning.code}>
          <span className="font-semibold">Warning:</span> {warning.message}
        </li>
      ))}
    </ul>
  );
}
