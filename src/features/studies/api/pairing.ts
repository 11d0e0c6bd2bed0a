import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { SaveAssignmentsInput } from '../../../../shared/schemas/study.schema.ts';
import type {
  PairingProposalsDto,
  StudyAssignmentsDto,
} from '../../../../shared/studies/study-dto.ts';
import { api } from '../../../lib/api-client.ts';
import { studyKeys } from './study-keys.ts';

export const useStudyAssignments = (studyId: number) =>
  useQuery({
    queryKey: studyKeys.assignments(studyId),
    queryFn: () =>
      api.get<StudyAssignmentsDto>(`/api/studies/${studyId}/assignments`),
  });

export const useProposePairing = (studyId: number) =>
  useMutation({
    mutationFn: () =>
      api.post<PairingProposalsDto>(`/api/studies/${studyId}/pairing/propose`),
  });

export function useSaveAssignments(studyId: number) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: SaveAssignmentsInput) =>
      api.put<unknown>(`/api/studies/${studyId}/assignments`, input),
    onSuccess: () =>
      client.invalidateQueries({ queryKey: studyKeys.study(studyId) }),
  });
}
