import { useQueryClient } from '@tanstack/react-query';
import { Link, useParams } from 'react-router-dom';
import {
  Empty,
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import { SafetyNotice } from '../../components/ui/safety-notice.tsx';
import { BaselineCard } from '../../features/baselines/components/baseline-card.tsx';
import { trendKeys, useRoomTrend } from '../../features/trends/api/trends.ts';
import { TrendChart } from '../../features/trends/components/trend-chart.tsx';
import { ErrorBoundary } from '../provider.tsx';

export default function RoomTrendPage() {
  const roomId = Number(useParams().id);
  const trend = useRoomTrend(roomId);
  const client = useQueryClient();
  const handleChanged = () =>
    void client.invalidateQueries({ queryKey: trendKeys.all });

  if (trend.isPending) return <Loading what="the trend" />;
  if (trend.isError)
    return (
      <ErrorNotice error={trend.error} onRetry={() => void trend.refetch()} />
    );
  const { room, groups, policyNote } = trend.data;
  return (
    <div className="space-y-6">
      <PageTitle
        actions={
          <Link
            to="/rooms"
            className="text-sm font-semibold text-lamina-700 hover:underline"
          >
            All rooms
          </Link>
        }
      >
        {room.name}: figures over time
      </PageTitle>
      <p className="-mt-4 text-sm text-slate-600">
        {room.site}. Each signed study’s field values, per grid, beam quality
        and phantom thickness; the shaded band is the baseline ± its tolerance.{' '}
        {policyNote}
      </p>
      {groups.length === 0 && (
        <Empty>No signed study of this room has figures yet.</Empty>
      )}
      {groups.map((group) => (
        <section
          key={group.key}
          aria-label={group.label}
          className="space-y-3 rounded-xl bg-white p-5 shadow-sm"
          data-testid="trend-group"
        >
          <h2 className="text-lg font-semibold text-lamina-950">
            {group.label}
          </h2>
          <ErrorBoundary label={group.label}>
            {group.baseline ? (
              <BaselineCard
                baseline={group.baseline}
                onChanged={handleChanged}
              />
            ) : (
              <p className="text-sm text-slate-500">
                No active baseline: set one from a signed study on the Compare
                page.
              </p>
            )}
            <div className="grid gap-3 lg:grid-cols-2">
              {group.series.map((series) => (
                <TrendChart key={series.figure} series={series} />
              ))}
            </div>
          </ErrorBoundary>
        </section>
      ))}
      <SafetyNotice />
    </div>
  );
}
