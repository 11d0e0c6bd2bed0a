import { useParams } from 'react-router-dom';
import {
  Empty,
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import { PageLinks } from '../../components/ui/page-links.tsx';
import { SafetyNotice } from '../../components/ui/safety-notice.tsx';
import { measuredFromFigures } from '../../features/geometry/components/measured-figures.ts';
import { StudyPredictionsSection } from '../../features/geometry/components/study-predictions-section.tsx';
import { useStudyResults } from '../../features/results/api/results.ts';
import { ConditionResultCard } from '../../features/results/components/condition-result-card.tsx';
import { RecomputePanel } from '../../features/results/components/recompute-panel.tsx';
import { ResultCharts } from '../../features/results/components/result-charts.tsx';
import { ResultsProgress } from '../../features/results/components/results-progress.tsx';
import { ErrorBoundary } from '../provider.tsx';

export default function StudyResultsPage() {
  const studyId = Number(useParams().id);
  const results = useStudyResults(studyId);

  if (results.isPending) return <Loading what="the results" />;
  if (results.isError)
    return (
      <ErrorNotice
        error={results.error}
        onRetry={() => void results.refetch()}
      />
    );
  const r = results.data;
  const computed = r.conditions.filter((c) => c.figures.length > 0);

  return (
    <div className="space-y-6">
      <PageTitle
        actions={
          <PageLinks
            links={[
              { to: `/studies/${studyId}`, label: 'Back to the study' },
              { to: `/studies/${studyId}/regions`, label: 'Regions' },
            ]}
          />
        }
      >
        Results
      </PageTitle>
      <p className="-mt-4 text-sm text-slate-600">
        {r.layout ? `Layout '${r.layout.name}'` : 'No region layout saved yet'}{' '}
        · {r.conditions.length} condition(s) · field values from phantom images,
        each with its 95 % interval
      </p>
      <ResultsProgress studyId={studyId} />
      <section
        aria-label="Settings"
        className="rounded-xl bg-white p-5 shadow-sm"
      >
        <RecomputePanel
          key={JSON.stringify(r.settings)}
          studyId={studyId}
          settings={r.settings}
          canRecompute={r.permissions.recompute}
        />
      </section>
      {r.conditions.length === 0 ? (
        <Empty>The study plan has no conditions yet.</Empty>
      ) : (
        <>
          {computed.length === 0 && (
            <Empty>
              No figures yet.{' '}
              {r.progress.isComputing
                ? 'They appear here as each condition is computed.'
                : r.layout
                  ? 'Assign the images to the conditions and recompute.'
                  : 'Draw and save the regions first.'}
            </Empty>
          )}
          {computed.length > 0 && (
            <ErrorBoundary label="Charts">
              <ResultCharts conditions={r.conditions} />
            </ErrorBoundary>
          )}
          <div className="space-y-4">
            {r.conditions.map((c) => (
              <ConditionResultCard key={c.conditionId} condition={c} />
            ))}
          </div>
        </>
      )}
      <ErrorBoundary label="Predicted figures">
        <StudyPredictionsSection
          studyId={studyId}
          measuredByCondition={Object.fromEntries(
            r.conditions.map((c) => [
              c.conditionId,
              c.figures.length > 0 ? measuredFromFigures(c.figures) : undefined,
            ]),
          )}
        />
      </ErrorBoundary>
      <SafetyNotice />
    </div>
  );
}
