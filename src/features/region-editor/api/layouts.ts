import {
  queryOptions,
  useMutation,
  useQuery,
  useQueryClient,
} from '@tanstack/react-query';
import type { RegionLayout } from '../../../../shared/analysis/region-layout.ts';
import type {
  ApplyLayoutInput,
  ApplyLayoutResultDto,
  FindObjectsResultDto,
  ImageRegionsDto,
  LayoutDto,
  SetImageRegionsInput,
  StudyLayoutDto,
} from '../../../../shared/schemas/layout.schema.ts';
import { api } from '../../../lib/api-client.ts';

const keys = {
  library: ['layouts'] as const,
  study: (studyId: number) => ['layouts', 'study', studyId] as const,
  image: (imageId: number) => ['layouts', 'image', imageId] as const,
};

export const libraryLayoutsQueryOptions = queryOptions({
  queryKey: keys.library,
  queryFn: () => api.get<LayoutDto[]>('/api/layouts'),
});

export const useLibraryLayouts = () => useQuery(libraryLayoutsQueryOptions);

export const studyLayoutQueryOptions = (studyId: number) =>
  queryOptions({
    queryKey: keys.study(studyId),
    queryFn: () => api.get<StudyLayoutDto>(`/api/studies/${studyId}/layout`),
  });

export const useStudyLayout = (studyId: number) =>
  useQuery(studyLayoutQueryOptions(studyId));

export const imageRegionsQueryOptions = (imageId: number) =>
  queryOptions({
    queryKey: keys.image(imageId),
    queryFn: () => api.get<ImageRegionsDto>(`/api/images/${imageId}/regions`),
  });

export const useImageRegions = (imageId: number) =>
  useQuery(imageRegionsQueryOptions(imageId));

/** Invalidates everything a layout change shows up in, results included. */
function useInvalidateLayouts(studyId: number) {
  const client = useQueryClient();
  return () =>
    Promise.all([
      client.invalidateQueries({ queryKey: ['layouts'] }),
      client.invalidateQueries({ queryKey: ['results', studyId] }),
    ]);
}

export function useSaveStudyLayout(studyId: number) {
  const invalidate = useInvalidateLayouts(studyId);
  return useMutation({
    mutationFn: (input: {
      layout: RegionLayout;
      referenceImageId: number | null;
    }) => api.put<StudyLayoutDto>(`/api/studies/${studyId}/layout`, input),
    onSuccess: invalidate,
  });
}

export function useCopyLibraryLayout(studyId: number) {
  const invalidate = useInvalidateLayouts(studyId);
  return useMutation({
    mutationFn: (fromLayoutId: number) =>
      api.put<StudyLayoutDto>(`/api/studies/${studyId}/layout`, {
        fromLayoutId,
      }),
    onSuccess: invalidate,
  });
}

export function useSaveLibraryLayout() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: {
      layout: RegionLayout;
      referenceImageId: number | null;
    }) => api.post<LayoutDto>('/api/layouts', input),
    onSuccess: () => client.invalidateQueries({ queryKey: keys.library }),
  });
}

export function useApplyLayout(studyId: number) {
  const invalidate = useInvalidateLayouts(studyId);
  return useMutation({
    mutationFn: (input: ApplyLayoutInput) =>
      api.post<ApplyLayoutResultDto>(
        `/api/studies/${studyId}/layout/apply`,
        input,
      ),
    onSuccess: invalidate,
  });
}

export function useSaveImageRegions(studyId: number, imageId: number) {
  const invalidate = useInvalidateLayouts(studyId);
  return useMutation({
    mutationFn: (input: SetImageRegionsInput) =>
      api.put<ImageRegionsDto>(`/api/images/${imageId}/regions`, input),
    onSuccess: invalidate,
  });
}

export function useFindObjects(imageId: number) {
  return useMutation({
    mutationFn: (input: { minRadiusPx: number; maxRadiusPx?: number }) =>
      api.post<FindObjectsResultDto>(
        `/api/images/${imageId}/find-objects`,
        input,
      ),
  });
}
