import {
  queryOptions,
  useMutation,
  useQuery,
  useQueryClient,
} from '@tanstack/react-query';
import type {
  AnalysisSettings,
  ResultsProgressDto,
  StudyResultsDto,
} from '../../../../shared/schemas/results.schema.ts';
import { api } from '../../../lib/api-client.ts';

export const resultsKeys = {
  study: (studyId: number) => ['results', studyId] as const,
  progress: (studyId: number) => ['results', studyId, 'progress'] as const,
};

/** How often the progress is asked for while a recomputation runs. */
const POLL_MS = 1000;

export const studyResultsQueryOptions = (studyId: number) =>
  queryOptions({
    queryKey: resultsKeys.study(studyId),
    queryFn: () => api.get<StudyResultsDto>(`/api/studies/${studyId}/results`),
  });

export const useStudyResults = (studyId: number) =>
  useQuery(studyResultsQueryOptions(studyId));

/** The progress, polled while any condition is queued or running. */
export const useResultsProgress = (studyId: number) =>
  useQuery({
    queryKey: resultsKeys.progress(studyId),
    queryFn: () =>
      api.get<ResultsProgressDto>(`/api/studies/${studyId}/results/progress`),
    refetchInterval: (query) =>
      query.state.data?.isComputing ? POLL_MS : false,
  });

export function useRecompute(studyId: number) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (settings: AnalysisSettings | undefined) =>
      api.post<ResultsProgressDto>(
        `/api/studies/${studyId}/results/recompute`,
        settings ? { settings } : {},
      ),
    onSuccess: (progress) => {
      client.setQueryData(resultsKeys.progress(studyId), progress);
      return client.invalidateQueries({
        queryKey: resultsKeys.study(studyId),
        exact: true,
      });
    },
  });
}
