import type { StudyAuditEntryDto } from '../../../../shared/studies/study-dto.ts';
import {
  Empty,
  ErrorNotice,
  Loading,
} from '../../../components/ui/page-state.tsx';
import { useStudyAudit } from '../api/review.ts';

const ACTION_WORDS: Record<string, string> = {
  'study.created': 'created the study',
  'study.updated': 'changed the plan or details',
  'study.assignments_saved': 'saved the pairing of images',
  'study.submitted': 'submitted it for review',
  'study.returned': 'returned it for changes',
  'study.signed': 'signed it',
  'study.revised': 'started a new revision',
  'study.commented': 'commented',
};

const words = (action: string) =>
  ACTION_WORDS[action] ?? action.replace(/[._]/g, ' ');

function detailText(entry: StudyAuditEntryDto): string | null {
  const d = entry.details;
  if (entry.action === 'study.updated' && Array.isArray(d.changed))
    return `changed: ${d.changed.join(', ')}`;
  if (entry.action === 'study.assignments_saved')
    return `${String(d.assigned)} images placed, ${String(d.byUser)} by hand`;
  if (typeof d.revision === 'number') return `revision ${d.revision}`;
  return null;
}

/** Every recorded change to the study, newest first. */
export function AuditTrail({ studyId }: { studyId: number }) {
  const audit = useStudyAudit(studyId);
  if (audit.isPending) return <Loading what="the audit trail" />;
  if (audit.isError)
    return (
      <ErrorNotice error={audit.error} onRetry={() => void audit.refetch()} />
    );
  if (audit.data.length === 0) return <Empty>Nothing recorded yet.</Empty>;
  return (
    <ol className="space-y-1 text-sm" aria-label="Audit trail">
      {audit.data.map((e) => {
        const detail = detailText(e);
        return (
          <li
            key={e.id}
            className="flex flex-wrap gap-x-2 border-b border-slate-100 py-1.5"
            data-testid="audit-entry"
          >
            <time className="tabular-nums text-slate-500" dateTime={e.at}>
              {new Date(e.at).toLocaleString('en-GB', {
                dateStyle: 'short',
                timeStyle: 'medium',
              })}
            </time>
            <span className="font-semibold text-slate-800">
              {e.actor?.displayName ?? 'System'}
            </span>
            <span className="text-slate-700">{words(e.action)}</span>
            {detail && <span className="text-slate-500">({detail})</span>}
          </li>
        );
      })}
    </ol>
  );
}
