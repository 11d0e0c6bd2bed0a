import { Link } from 'react-router-dom';
import type { ListStudiesQuery } from '../../../shared/schemas/study.schema.ts';
import type { Role } from '../../../shared/permissions.ts';
import {
  Empty,
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import { SafetyNotice } from '../../components/ui/safety-notice.tsx';
import { useSession } from '../../features/auth/api/session.ts';
import { useStudies } from '../../features/studies/api/studies.ts';
import { StudyList } from '../../features/studies/components/study-list.tsx';

interface HomeList {
  title: string;
  filters: ListStudiesQuery;
  empty: string;
}

const HOME: Record<
  Role,
  { title: string; lines: string[]; lists: HomeList[] }
> = {
  admin: {
    title: 'Administration',
    lines: [
      'Invite staff and set their roles under Users.',
      'Keep the equipment register up to date.',
    ],
    lists: [],
  },
  physicist: {
    title: 'Studies to review and sign',
    lines: [
      'Open a study to check its plan, pairing, figures and warnings, then return it with comments or sign it.',
    ],
    lists: [
      {
        title: 'Waiting for your review',
        filters: { status: 'submitted' },
        empty: 'No study is waiting for review.',
      },
      {
        title: 'Your drafts',
        filters: { status: 'draft', mine: true },
        empty: 'You have no draft.',
      },
    ],
  },
  resident: {
    title: 'Your studies',
    lines: [
      'Plan a study, take its checklist into the room, upload the session and pair the images.',
      'Submit the study for review when the figures and your interpretation are ready.',
    ],
    lists: [
      {
        title: 'Returned to you for changes',
        filters: { status: 'returned', mine: true },
        empty: 'Nothing has been returned to you.',
      },
      {
        title: 'Your drafts',
        filters: { status: 'draft', mine: true },
        empty: 'You have no draft. Plan a study to start.',
      },
    ],
  },
  committee: {
    title: 'Signed studies and comparisons',
    lines: ['Read signed studies and compare rooms, grids and beam qualities.'],
    lists: [
      {
        title: 'Signed studies',
        filters: { status: 'signed' },
        empty: 'No study has been signed yet.',
      },
    ],
  },
};

function StudiesNeedingYou({ list }: { list: HomeList }) {
  const studies = useStudies(list.filters);
  return (
    <section aria-label={list.title} className="space-y-3">
      <h2 className="text-lg font-semibold text-lamina-950">{list.title}</h2>
      {studies.isPending && <Loading what="studies" />}
      {studies.isError && (
        <ErrorNotice
          error={studies.error}
          onRetry={() => void studies.refetch()}
        />
      )}
      {studies.data && studies.data.length === 0 && <Empty>{list.empty}</Empty>}
      {studies.data && studies.data.length > 0 && (
        <StudyList studies={studies.data} />
      )}
    </section>
  );
}

export default function HomePage() {
  const { data } = useSession();
  if (!data) return null;
  const home = HOME[data.user.role];
  return (
    <div className="space-y-6">
      <PageTitle
        actions={
          data.can.editStudies && (
            <Link
              to="/studies/new"
              className="rounded-lg bg-lamina-700 px-4 py-2 text-sm font-semibold text-white hover:bg-lamina-800"
            >
              Plan a new study
            </Link>
          )
        }
      >
        {home.title}
      </PageTitle>
      <div className="space-y-1 text-slate-700" data-testid="role-home">
        {home.lines.map((line) => (
          <p key={line}>{line}</p>
        ))}
      </div>
      {home.lists.map((list) => (
        <StudiesNeedingYou key={list.title} list={list} />
      ))}
      <SafetyNotice />
    </div>
  );
}
