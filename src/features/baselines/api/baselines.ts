import {
  queryOptions,
  useMutation,
  useQuery,
  useQueryClient,
} from '@tanstack/react-query';
import type {
  BaselineDto,
  CreateBaselineInput,
  UpdateBaselineInput,
} from '../../../../shared/schemas/compare.schema.ts';
import { api } from '../../../lib/api-client.ts';

/** Query keys of the baselines feature. */
export const baselineKeys = {
  all: ['baselines'] as const,
  ofRoom: (roomId: number) => ['baselines', 'room', roomId] as const,
};

export const roomBaselinesQueryOptions = (roomId: number) =>
  queryOptions({
    queryKey: baselineKeys.ofRoom(roomId),
    queryFn: () => api.get<BaselineDto[]>(`/api/baselines?roomId=${roomId}`),
  });

/** Every baseline of a room, active and retired, newest first. */
export const useRoomBaselines = (roomId: number) =>
  useQuery(roomBaselinesQueryOptions(roomId));

/**
 * Mutations call `onChanged` after success so the page can refresh what it
 * shows beside baselines (board, trends).
 */
export function useCreateBaseline(onChanged?: () => void) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (
      input: Partial<CreateBaselineInput> & { conditionId: number },
    ) => api.post<BaselineDto>('/api/baselines', input),
    onSuccess: () => {
      void client.invalidateQueries({ queryKey: baselineKeys.all });
      onChanged?.();
    },
  });
}

export function useUpdateBaseline(onChanged?: () => void) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: ({ id, change }: { id: number; change: UpdateBaselineInput }) =>
      api.patch<BaselineDto>(`/api/baselines/${id}`, change),
    onSuccess: () => {
      void client.invalidateQueries({ queryKey: baselineKeys.all });
      onChanged?.();
    },
  });
}

export function useDeleteBaseline(onChanged?: () => void) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => api.delete<void>(`/api/baselines/${id}`),
    onSuccess: () => {
      void client.invalidateQueries({ queryKey: baselineKeys.all });
      onChanged?.();
    },
  });
}
