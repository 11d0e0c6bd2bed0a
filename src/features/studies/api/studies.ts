import {
  queryOptions,
  useMutation,
  useQuery,
  useQueryClient,
} from '@tanstack/react-query';
import type {
  CreateStudyInput,
  ListStudiesQuery,
  UpdateStudyInput,
} from '../../../../shared/schemas/study.schema.ts';
import type {
  ChecklistDto,
  StudyDto,
  StudyOptionsDto,
  StudySummaryDto,
} from '../../../../shared/studies/study-dto.ts';
import { api } from '../../../lib/api-client.ts';
import { studyKeys } from './study-keys.ts';

const queryString = (filters: ListStudiesQuery): string => {
  const params = new URLSearchParams();
  if (filters.status) params.set('status', filters.status);
  if (filters.roomId) params.set('roomId', String(filters.roomId));
  if (filters.mine) params.set('mine', 'true');
  const text = params.toString();
  return text ? `?${text}` : '';
};

export const studiesQueryOptions = (filters: ListStudiesQuery) =>
  queryOptions({
    queryKey: studyKeys.list(filters),
    queryFn: () =>
      api.get<StudySummaryDto[]>(`/api/studies${queryString(filters)}`),
  });

export const useStudies = (filters: ListStudiesQuery) =>
  useQuery(studiesQueryOptions(filters));

export const studyQueryOptions = (id: number) =>
  queryOptions({
    queryKey: studyKeys.study(id),
    queryFn: () => api.get<StudyDto>(`/api/studies/${id}`),
  });

export const useStudy = (id: number) => useQuery(studyQueryOptions(id));

export const useStudyOptions = () =>
  useQuery({
    queryKey: studyKeys.options(),
    queryFn: () => api.get<StudyOptionsDto>('/api/studies/options'),
  });

export const useChecklist = (id: number) =>
  useQuery({
    queryKey: studyKeys.checklist(id),
    queryFn: () => api.get<ChecklistDto>(`/api/studies/${id}/checklist`),
  });

export function useCreateStudy() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateStudyInput) =>
      api.post<StudyDto>('/api/studies', input),
    onSuccess: (study) => {
      client.setQueryData(studyKeys.study(study.id), study);
      void client.invalidateQueries({ queryKey: studyKeys.all });
    },
  });
}

export function useUpdateStudy(id: number) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (change: UpdateStudyInput) =>
      api.patch<StudyDto>(`/api/studies/${id}`, change),
    onSuccess: () => client.invalidateQueries({ queryKey: studyKeys.all }),
  });
}
