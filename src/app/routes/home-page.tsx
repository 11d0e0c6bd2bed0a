import { PageTitle } from '../../components/ui/page-state.tsx';
import { SafetyNotice } from '../../components/ui/safety-notice.tsx';
import { useSession } from '../../features/auth/api/session.ts';
import type { Role } from '../../../shared/permissions.ts';

const GREETING: Record<Role, { title: string; lines: string[] }> = {
  admin: {
    title: 'Administration',
    lines: [
      'Invite staff and set their roles under Users.',
      'Keep the equipment register up to date.',
    ],
  },
  physicist: {
    title: 'Studies to review and sign',
    lines: [
      'Studies submitted by residents wait here for your review.',
      'Open a study to check its regions, figures and warnings before you sign.',
    ],
  },
  resident: {
    title: 'Your studies',
    lines: [
      'Plan a study, take its checklist into the room, upload the session and place the regions.',
      'Submit the study for review when the figures and your interpretation are ready.',
    ],
  },
  committee: {
    title: 'Signed studies and comparisons',
    lines: ['Read signed studies and compare rooms, grids and beam qualities.'],
  },
};

export default function HomePage() {
  const { data } = useSession();
  if (!data) return null;
  const greeting = GREETING[data.user.role];
  return (
    <div className="space-y-6">
      <PageTitle>{greeting.title}</PageTitle>
      <div className="space-y-1 text-slate-700" data-testid="role-home">
        {greeting.lines.map((line) => (
          <p key={line}>{line}</p>
        ))}
      </div>
      <SafetyNotice />
    </div>
  );
}
