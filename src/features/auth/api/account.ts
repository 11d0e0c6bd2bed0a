import { queryOptions, useMutation, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client.ts';

export interface TokenInfo {
  purpose: 'invitation' | 'password_reset';
  email: string;
  displayName: string;
}

export const tokenQueryOptions = (token: string) =>
  queryOptions({
    queryKey: ['account-tokens', token],
    queryFn: () =>
      api.get<TokenInfo>(`/api/auth/tokens/${encodeURIComponent(token)}`),
    staleTime: Infinity,
  });

export const useTokenInfo = (token: string) =>
  useQuery(tokenQueryOptions(token));

export const useCompleteToken = (purpose: TokenInfo['purpose']) =>
  useMutation({
    mutationFn: (input: { token: string; password: string }) =>
      api.post<void>(
        purpose === 'invitation'
          ? '/api/auth/invitation/complete'
          : '/api/auth/password-reset/complete',
        input,
      ),
  });

export const useRequestPasswordReset = () =>
  useMutation({
    mutationFn: (email: string) =>
      api.post<{ message: string }>('/api/auth/password-reset', { email }),
  });

export const useChangePassword = () =>
  useMutation({
    mutationFn: (input: { currentPassword: string; newPassword: string }) =>
      api.post<void>('/api/auth/password', input),
  });
