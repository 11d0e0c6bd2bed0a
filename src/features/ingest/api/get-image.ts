import { queryOptions, useQuery } from '@tanstack/react-query';
import type {
  ImageDetailDto,
  ImageDto,
} from '../../../../shared/schemas/image.schema.ts';
import { api } from '../../../lib/api-client.ts';

export const imagesQueryKey = ['images'] as const;

export const imageQueryOptions = (id: number) =>
  queryOptions({
    queryKey: [...imagesQueryKey, id],
    queryFn: () => api.get<ImageDetailDto>(`/api/images/${id}`),
  });

export const useImage = (id: number) => useQuery(imageQueryOptions(id));

export const studyImagesQueryOptions = (studyId: number) =>
  queryOptions({
    queryKey: [...imagesQueryKey, 'study', studyId],
    queryFn: () => api.get<ImageDto[]>(`/api/images?studyId=${studyId}`),
  });

export const useStudyImages = (studyId: number) =>
  useQuery(studyImagesQueryOptions(studyId));
