import type { Warning } from '../../../../shared/warnings.ts';
import { WarningList } from './warning-list.tsx';

/**
 * The automatic geometry check of a study: shown on the study page when the
 * planned or recorded SID is outside a focused grid's focusing range.
 */
export function StudyGeometryWarnings({
  warnings,
}: {
  warnings: readonly Warning[];
}) {
  if (warnings.length === 0) return null;
  return (
    <section aria-label="Grid geometry check" className="space-y-2">
      <h3 className="font-semibold text-lamina-950">Grid geometry check</h3>
      <WarningList warnings={warnings} testId="study-geometry-warnings" />
      <p className="text-xs text-slate-500">
        Try the set-up in the Geometry planner to see the loss across the field.
      </p>
    </section>
  );
}
