import { queryOptions, useQuery } from '@tanstack/react-query';
import type {
  RoomSummaryDto,
  RoomTrendDto,
} from '../../../../shared/schemas/compare.schema.ts';
import { api } from '../../../lib/api-client.ts';

/** Query keys of the trends feature. */
export const trendKeys = {
  all: ['trends'] as const,
  room: (roomId: number) => ['trends', 'room', roomId] as const,
  summary: ['trends', 'summary'] as const,
};

export const roomTrendQueryOptions = (roomId: number) =>
  queryOptions({
    queryKey: trendKeys.room(roomId),
    queryFn: () => api.get<RoomTrendDto>(`/api/rooms/${roomId}/trend`),
  });

/** Each condition match of a room over its signed studies, with bands. */
export const useRoomTrend = (roomId: number) =>
  useQuery(roomTrendQueryOptions(roomId));

export const roomSummaryQueryOptions = queryOptions({
  queryKey: trendKeys.summary,
  queryFn: () => api.get<RoomSummaryDto[]>('/api/room-summary'),
});

/** The latest status of every room. */
export const useRoomSummary = () => useQuery(roomSummaryQueryOptions);
