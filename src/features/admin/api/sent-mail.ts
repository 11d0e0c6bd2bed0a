import { queryOptions, useQuery } from '@tanstack/react-query';
import type { SentMailDto } from '../../../../shared/schemas/mail.schema.ts';
import { api } from '../../../lib/api-client.ts';

export const sentMailQueryOptions = queryOptions({
  queryKey: ['sent-mail'],
  queryFn: () => api.get<SentMailDto[]>('/api/mail'),
  refetchInterval: 5000,
});

export const useSentMail = () => useQuery(sentMailQueryOptions);
