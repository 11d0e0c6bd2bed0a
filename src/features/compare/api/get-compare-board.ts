import {
  keepPreviousData,
  queryOptions,
  useQuery,
} from '@tanstack/react-query';
import type {
  CompareBoardDto,
  CompareOptionsDto,
} from '../../../../shared/schemas/compare.schema.ts';
import { api } from '../../../lib/api-client.ts';
import { boardUrl, compareKeys, type BoardFilters } from './compare-query.ts';

export const compareBoardQueryOptions = (filters: BoardFilters) =>
  queryOptions({
    queryKey: compareKeys.board(filters),
    queryFn: () => api.get<CompareBoardDto>(boardUrl(filters)),
    placeholderData: keepPreviousData,
  });

/** The board for the filters; keeps showing the last board while refetching. */
export const useCompareBoard = (filters: BoardFilters) =>
  useQuery(compareBoardQueryOptions(filters));

export const compareOptionsQueryOptions = queryOptions({
  queryKey: compareKeys.options,
  queryFn: () => api.get<CompareOptionsDto>('/api/compare/options'),
  staleTime: 5 * 60_000,
});

/** Rooms, grids and detectors to filter by, and what the viewer may do. */
export const useCompareOptions = () => useQuery(compareOptionsQueryOptions);
