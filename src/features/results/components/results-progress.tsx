import { useQueryClient } from '@tanstack/react-query';
import { useEffect, useRef } from 'react';
import { resultsKeys, useResultsProgress } from '../api/results.ts';

/**
 * A progress bar while the study is recomputed; when the last condition is
 * done the results are fetched again.
 */
export function ResultsProgress({ studyId }: { studyId: number }) {
  const progress = useResultsProgress(studyId);
  const client = useQueryClient();
  const wasComputing = useRef(false);
  const isComputing = progress.data?.isComputing ?? false;

  useEffect(() => {
    if (wasComputing.current && !isComputing) {
      void client.invalidateQueries({
        queryKey: resultsKeys.study(studyId),
        exact: true,
      });
    }
    wasComputing.current = isComputing;
  }, [client, isComputing, studyId]);

  const p = progress.data;
  if (!p || !p.isComputing) return null;
  const finished = p.done + p.failed;
  return (
    <div
      data-testid="results-progress"
      className="rounded-lg border border-lamina-200 bg-lamina-50 p-4 text-sm text-lamina-900"
    >
      <p>
        Recomputing: {finished} of {p.total} conditions finished
        {p.running > 0 ? `, ${p.running} running` : ''}
        {p.queued > 0 ? `, ${p.queued} waiting` : ''}.
      </p>
      <div
        role="progressbar"
        aria-label="Conditions recomputed"
        aria-valuemin={0}
        aria-valuemax={p.total}
        aria-valuenow={finished}
        className="mt-2 h-2 overflow-hidden rounded-full bg-lamina-100"
      >
        <div
          className="h-full bg-lamina-600 transition-all"
          style={{ width: `${p.total > 0 ? (100 * finished) / p.total : 0}%` }}
        />
      </div>
    </div>
  );
}
