import type { StudyStatus } from '../../../../shared/schemas/study.schema.ts';
import { STUDY_STATUS_LABELS } from '../../../../shared/studies/status-labels.ts';

const TONES: Record<StudyStatus, string> = {
  draft: 'bg-slate-100 text-slate-800 ring-slate-300',
  submitted: 'bg-lamina-100 text-lamina-900 ring-lamina-300',
  returned: 'bg-caution-100 text-caution-900 ring-caution-500/50',
  signed: 'bg-lamina-800 text-white ring-lamina-900',
};

export function StudyStatusBadge({ status }: { status: StudyStatus }) {
  return (
    <span
      data-testid="study-status"
      className={`inline-flex rounded-full px-2.5 py-0.5 text-xs font-semibold ring-1 ${TONES[status]}`}
    >
      {STUDY_STATUS_LABELS[status]}
    </span>
  );
}
