import { useQueryClient } from '@tanstack/react-query';
import { useSearchParams } from 'react-router-dom';
import type { FigureKey } from '../../../shared/figures.ts';
import {
  Empty,
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import { SafetyNotice } from '../../components/ui/safety-notice.tsx';
import { SetBaselineButton } from '../../features/baselines/components/set-baseline-button.tsx';
import {
  compareKeys,
  filtersFromSearch,
  searchFromFilters,
  type BoardFilters,
} from '../../features/compare/api/compare-query.ts';
import {
  useCompareBoard,
  useCompareOptions,
} from '../../features/compare/api/get-compare-board.ts';
import { BoardCharts } from '../../features/compare/components/board-charts.tsx';
import { CompareFilters } from '../../features/compare/components/compare-filters.tsx';
import { ConditionsTable } from '../../features/compare/components/conditions-table.tsx';
import { BoardDownloads } from '../../features/compare/components/download-links.tsx';
import { FieldVsStatedTable } from '../../features/compare/components/field-vs-stated-table.tsx';
import { VerdictSummary } from '../../features/compare/components/verdict-summary.tsx';
import { trendKeys } from '../../features/trends/api/trends.ts';
import { ErrorBoundary } from '../provider.tsx';

export default function ComparePage() {
  const [search, setSearch] = useSearchParams();
  const filters = filtersFromSearch(search);
  const options = useCompareOptions();
  const board = useCompareBoard(filters);
  const client = useQueryClient();
  const handleBaselineChanged = () => {
    void client.invalidateQueries({ queryKey: compareKeys.all });
    void client.invalidateQueries({ queryKey: trendKeys.all });
  };
  const handleFilters = (next: BoardFilters) =>
    setSearch(searchFromFilters(next));

  return (
    <div className="space-y-6">
      <PageTitle actions={<BoardDownloads filters={filters} />}>
        Compare rooms, grids and beam qualities
      </PageTitle>
      {options.isPending && <Loading what="the filters" />}
      {options.isError && (
        <ErrorNotice
          error={options.error}
          onRetry={() => void options.refetch()}
        />
      )}
      {options.data && (
        <CompareFilters
          key={search.toString()}
          options={options.data}
          value={filters}
          error={board.error}
          onChange={handleFilters}
        />
      )}
      {board.isPending && <Loading what="the comparison" />}
      {board.isError && (
        <ErrorNotice error={board.error} onRetry={() => void board.refetch()} />
      )}
      {board.data && board.data.total === 0 && (
        <Empty>
          No {board.data.scope === 'signed' ? 'signed ' : ''}study condition
          matches these filters.
        </Empty>
      )}
      {board.data && board.data.total > 0 && (
        <div className="space-y-6" data-testid="compare-board">
          {board.data.scope !== 'signed' && (
            <p className="rounded-lg bg-caution-50 p-3 text-sm text-caution-900">
              Unsigned studies are included and marked; their figures may still
              change.
            </p>
          )}
          <ErrorBoundary label="verdicts">
            <VerdictSummary verdicts={board.data.verdicts} />
          </ErrorBoundary>
          <ErrorBoundary label="charts">
            <BoardCharts
              charts={board.data.charts}
              note={board.data.notes.aggregation}
            />
          </ErrorBoundary>
          <ErrorBoundary label="field and stated values">
            <FieldVsStatedTable
              grids={board.data.grids}
              note={board.data.notes.fieldVsStated}
            />
          </ErrorBoundary>
          <ErrorBoundary label="conditions">
            <ConditionsTable
              conditions={board.data.conditions}
              total={board.data.total}
              actions={
                board.data.permissions.setBaseline
                  ? (c) =>
                      c.study.status === 'signed' && !c.baseline?.isSource ? (
                        <SetBaselineButton
                          conditionId={c.conditionId}
                          figures={Object.keys(c.figures) as FigureKey[]}
                          label={c.label}
                          onChanged={handleBaselineChanged}
                        />
                      ) : null
                  : undefined
              }
            />
          </ErrorBoundary>
          <p className="text-xs text-slate-500">{board.data.notes.tolerance}</p>
        </div>
      )}
      <SafetyNotice />
    </div>
  );
}
