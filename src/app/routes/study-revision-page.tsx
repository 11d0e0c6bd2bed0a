import { Link, useParams } from 'react-router-dom';
import {
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import { SafetyNotice } from '../../components/ui/safety-notice.tsx';
import { useRevision } from '../../features/review/api/review.ts';
import { RevisionSnapshot } from '../../features/review/components/revision-snapshot.tsx';

export default function StudyRevisionPage() {
  const params = useParams();
  const id = Number(params.id);
  const revision = useRevision(id, Number(params.revision));
  return (
    <div className="space-y-6">
      {revision.isPending && <Loading what="the signed revision" />}
      {revision.isError && (
        <ErrorNotice
          error={revision.error}
          onRetry={() => void revision.refetch()}
        />
      )}
      {revision.data && (
        <>
          <PageTitle
            actions={
              <Link
                to={`/studies/${id}`}
                className="text-sm text-lamina-700 underline"
              >
                Back to the current revision
              </Link>
            }
          >
            {revision.data.snapshot.study.title} · revision{' '}
            {revision.data.revision} as signed
          </PageTitle>
          <RevisionSnapshot revision={revision.data} />
        </>
      )}
      <SafetyNotice />
    </div>
  );
}
