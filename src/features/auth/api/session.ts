import {
  queryOptions,
  useMutation,
  useQuery,
  useQueryClient,
} from '@tanstack/react-query';
import type {
  SessionDto,
  SignInInput,
} from '../../../../shared/schemas/auth.schema.ts';
import { api, ApiError } from '../../../lib/api-client.ts';

export const sessionQueryOptions = queryOptions({
  queryKey: ['session'],
  queryFn: async (): Promise<SessionDto | null> => {
    try {
      return await api.get<SessionDto>('/api/auth/me');
    } catch (error) {
      if (error instanceof ApiError && error.status === 401) return null;
      throw error;
    }
  },
  staleTime: 60_000,
});

export const useSession = () => useQuery(sessionQueryOptions);

export function useSignIn() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: SignInInput) =>
      api.post<SessionDto>('/api/auth/sign-in', input),
    onSuccess: (session) => {
      client.clear();
      client.setQueryData(sessionQueryOptions.queryKey, session);
    },
  });
}

export function useSignOut() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: () => api.post<void>('/api/auth/sign-out'),
    onSettled: () => {
      client.clear();
      client.setQueryData(sessionQueryOptions.queryKey, null);
    },
  });
}
