import { Link } from 'react-router-dom';
import { STUDY_STATUS_LABELS } from '../../../../shared/studies/status-labels.ts';
import {
  Empty,
  ErrorNotice,
  Loading,
} from '../../../components/ui/page-state.tsx';
import { useRevisions } from '../api/review.ts';

/** Signed revisions (each readable as it was signed) and the current one. */
export function RevisionList({ studyId }: { studyId: number }) {
  const revisions = useRevisions(studyId);
  if (revisions.isPending) return <Loading what="the revisions" />;
  if (revisions.isError)
    return (
      <ErrorNotice
        error={revisions.error}
        onRetry={() => void revisions.refetch()}
      />
    );
  if (revisions.data.length === 0) return <Empty>No revision yet.</Empty>;
  return (
    <ul className="space-y-1 text-sm" aria-label="Revisions">
      {revisions.data.map((r) => (
        <li key={r.revision} className="flex flex-wrap gap-x-2">
          <span className="font-semibold">Revision {r.revision}</span>
          <span className="text-slate-600">
            {STUDY_STATUS_LABELS[r.status]}
          </span>
          {r.signedBy && r.signedAt && (
            <span className="text-slate-600">
              by {r.signedBy.displayName} on{' '}
              {new Date(r.signedAt).toLocaleDateString('en-GB', {
                dateStyle: 'medium',
              })}
              {r.selfSigned && ' (own study)'}
            </span>
          )}
          {r.status === 'signed' && (
            <Link
              to={`/studies/${studyId}/revisions/${r.revision}`}
              className="text-lamina-700 underline"
            >
              Read as signed
            </Link>
          )}
          {r.isCurrent && (
            <span className="text-xs text-lamina-700">current</span>
          )}
        </li>
      ))}
    </ul>
  );
}
