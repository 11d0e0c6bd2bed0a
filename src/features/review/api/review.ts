import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type {
  StudyAuditEntryDto,
  StudyCommentDto,
  StudyDto,
  StudyRevisionDto,
  StudyRevisionSummaryDto,
} from '../../../../shared/studies/study-dto.ts';
import { api } from '../../../lib/api-client.ts';

/**
 * Review data lives under the study's own key (`['studies', id]`), so a
 * state change refreshes the study page, its thread, trail and lists.
 */
const reviewKeys = {
  studies: ['studies'] as const,
  study: (id: number) => ['studies', id] as const,
  comments: (id: number) => ['studies', id, 'comments'] as const,
  audit: (id: number) => ['studies', id, 'audit'] as const,
  revisions: (id: number) => ['studies', id, 'revisions'] as const,
  revision: (id: number, n: number) => ['studies', id, 'revisions', n] as const,
};

/** The body each state action sends. */
export type StudyActionInput =
  | { action: 'submit' }
  | { action: 'return'; comment: string }
  | { action: 'sign'; comment?: string }
  | { action: 'revise' };

export function useStudyAction(studyId: number) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: ({ action, ...body }: StudyActionInput) =>
      api.post<StudyDto>(`/api/studies/${studyId}/${action}`, body),
    onSuccess: (study) => {
      client.setQueryData(reviewKeys.study(studyId), study);
      void client.invalidateQueries({ queryKey: reviewKeys.studies });
    },
  });
}

export const useComments = (studyId: number) =>
  useQuery({
    queryKey: reviewKeys.comments(studyId),
    queryFn: () =>
      api.get<StudyCommentDto[]>(`/api/studies/${studyId}/comments`),
  });

export function useAddComment(studyId: number) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (body: string) =>
      api.post<StudyCommentDto>(`/api/studies/${studyId}/comments`, { body }),
    onSuccess: () =>
      client.invalidateQueries({ queryKey: reviewKeys.study(studyId) }),
  });
}

export const useStudyAudit = (studyId: number) =>
  useQuery({
    queryKey: reviewKeys.audit(studyId),
    queryFn: () =>
      api.get<StudyAuditEntryDto[]>(`/api/studies/${studyId}/audit`),
  });

export const useRevisions = (studyId: number) =>
  useQuery({
    queryKey: reviewKeys.revisions(studyId),
    queryFn: () =>
      api.get<StudyRevisionSummaryDto[]>(`/api/studies/${studyId}/revisions`),
  });

export const useRevision = (studyId: number, revision: number) =>
  useQuery({
    queryKey: reviewKeys.revision(studyId, revision),
    queryFn: () =>
      api.get<StudyRevisionDto>(
        `/api/studies/${studyId}/revisions/${revision}`,
      ),
  });
