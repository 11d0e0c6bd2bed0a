import { queryOptions, useQuery } from '@tanstack/react-query';
import type { StudyPredictionsDto } from '../../../../shared/schemas/geometry-api.schema.ts';
import { api } from '../../../lib/api-client.ts';
import { geometryKeys } from './geometry-keys.ts';

/** Predicted figures for every condition of a study at an assumed SPR. */
export const studyPredictionsQueryOptions = (
  studyId: number,
  scatterToPrimaryRatio: number,
) =>
  queryOptions({
    queryKey: geometryKeys.studyPredictions(studyId, scatterToPrimaryRatio),
    queryFn: () =>
      api.get<StudyPredictionsDto>(
        `/api/geometry/studies/${studyId}/predictions?spr=${scatterToPrimaryRatio}`,
      ),
  });

export const useStudyPredictions = (
  studyId: number,
  scatterToPrimaryRatio: number,
) => useQuery(studyPredictionsQueryOptions(studyId, scatterToPrimaryRatio));
