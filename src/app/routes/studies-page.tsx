import { useState } from 'react';
import { Link } from 'react-router-dom';
import type { ListStudiesQuery } from '../../../shared/schemas/study.schema.ts';
import {
  Empty,
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import { useSession } from '../../features/auth/api/session.ts';
import {
  useStudies,
  useStudyOptions,
} from '../../features/studies/api/studies.ts';
import { StudyFilters } from '../../features/studies/components/study-filters.tsx';
import { StudyList } from '../../features/studies/components/study-list.tsx';

export default function StudiesPage() {
  const { data: session } = useSession();
  const [filters, setFilters] = useState<ListStudiesQuery>({});
  const studies = useStudies(filters);
  const options = useStudyOptions();
  if (!session) return null;
  const isCommittee = session.user.role === 'committee';

  return (
    <div className="space-y-6">
      <PageTitle
        actions={
          session.can.editStudies && (
            <Link
              to="/studies/new"
              className="rounded-lg bg-lamina-700 px-4 py-2 text-sm font-semibold text-white hover:bg-lamina-800"
            >
              Plan a new study
            </Link>
          )
        }
      >
        {isCommittee ? 'Signed studies' : 'Studies'}
      </PageTitle>
      <StudyFilters
        filters={filters}
        rooms={options.data?.rooms ?? []}
        canFilterStatus={!isCommittee}
        onChange={setFilters}
      />
      {studies.isPending && <Loading what="studies" />}
      {studies.isError && (
        <ErrorNotice
          error={studies.error}
          onRetry={() => void studies.refetch()}
        />
      )}
      {studies.data && studies.data.length === 0 && (
        <Empty>
          {Object.keys(filters).length > 0
            ? 'No study matches these filters.'
            : isCommittee
              ? 'No study has been signed yet.'
              : 'No study yet. Plan one to get a checklist for the room.'}
        </Empty>
      )}
      {studies.data && studies.data.length > 0 && (
        <StudyList studies={studies.data} />
      )}
    </div>
  );
}
