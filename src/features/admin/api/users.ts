import {
  queryOptions,
  useMutation,
  useQuery,
  useQueryClient,
} from '@tanstack/react-query';
import type {
  InviteUserInput,
  UpdateUserInput,
  UserDto,
} from '../../../../shared/schemas/auth.schema.ts';
import { api } from '../../../lib/api-client.ts';

export const usersQueryOptions = queryOptions({
  queryKey: ['users'],
  queryFn: () => api.get<UserDto[]>('/api/users'),
});

export const useUsers = () => useQuery(usersQueryOptions);

export function useInviteUser() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: InviteUserInput) =>
      api.post<UserDto>('/api/users', input),
    onSuccess: () =>
      client.invalidateQueries({ queryKey: usersQueryOptions.queryKey }),
  });
}

export function useUpdateUser() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: ({ id, change }: { id: number; change: UpdateUserInput }) =>
      api.patch<UserDto>(`/api/users/${id}`, change),
    onSuccess: () =>
      client.invalidateQueries({ queryKey: usersQueryOptions.queryKey }),
  });
}
