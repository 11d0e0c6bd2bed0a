import {
  Empty,
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import { SafetyNotice } from '../../components/ui/safety-notice.tsx';
import { useRoomSummary } from '../../features/trends/api/trends.ts';
import { RoomSummaryTable } from '../../features/trends/components/room-summary-table.tsx';

export default function RoomSummaryPage() {
  const summary = useRoomSummary();
  return (
    <div className="space-y-6">
      <PageTitle>Rooms at a glance</PageTitle>
      <p className="-mt-4 text-sm text-slate-600">
        The latest signed study of each room, checked against the room’s active
        baselines.
      </p>
      {summary.isPending && <Loading what="the rooms" />}
      {summary.isError && (
        <ErrorNotice
          error={summary.error}
          onRetry={() => void summary.refetch()}
        />
      )}
      {summary.data && summary.data.length === 0 && (
        <Empty>No room is registered yet.</Empty>
      )}
      {summary.data && summary.data.length > 0 && (
        <RoomSummaryTable rooms={summary.data} />
      )}
      <SafetyNotice />
    </div>
  );
}
