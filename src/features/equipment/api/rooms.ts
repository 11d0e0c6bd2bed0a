import {
  queryOptions,
  useMutation,
  useQuery,
  useQueryClient,
} from '@tanstack/react-query';
import type {
  CreateRoomInput,
  CreateXrayUnitInput,
  RoomDetailDto,
  UpdateRoomInput,
  XrayUnitDto,
} from '../../../../shared/schemas/equipment.schema.ts';
import { api } from '../../../lib/api-client.ts';
import { equipmentKeys } from './equipment-keys.ts';

export const roomsQueryOptions = queryOptions({
  queryKey: equipmentKeys.rooms(),
  queryFn: () => api.get<RoomDetailDto[]>('/api/equipment/rooms'),
});

export const roomQueryOptions = (id: number) =>
  queryOptions({
    queryKey: equipmentKeys.room(id),
    queryFn: () => api.get<RoomDetailDto>(`/api/equipment/rooms/${id}`),
  });

export const useRooms = () => useQuery(roomsQueryOptions);
export const useRoom = (id: number) => useQuery(roomQueryOptions(id));

/**
 * A mutation that refreshes the whole register when it succeeds. The
 * refresh is not awaited, so a page can leave a deleted record at once
 * instead of first refetching it into a 404.
 */
export function useEquipmentMutation<TInput, TResult>(
  mutationFn: (input: TInput) => Promise<TResult>,
) {
  const client = useQueryClient();
  return useMutation({
    mutationFn,
    onSuccess: () => {
      void client.invalidateQueries({ queryKey: equipmentKeys.all });
    },
  });
}

export const useCreateRoom = () =>
  useEquipmentMutation((input: CreateRoomInput) =>
    api.post<RoomDetailDto>('/api/equipment/rooms', input),
  );

export const useUpdateRoom = (id: number) =>
  useEquipmentMutation((input: UpdateRoomInput) =>
    api.patch<RoomDetailDto>(`/api/equipment/rooms/${id}`, input),
  );

export const useDeleteRoom = () =>
  useEquipmentMutation((id: number) =>
    api.delete<void>(`/api/equipment/rooms/${id}`),
  );

export const useCreateXrayUnit = () =>
  useEquipmentMutation((input: CreateXrayUnitInput) =>
    api.post<XrayUnitDto>('/api/equipment/units', input),
  );

export const useDeleteXrayUnit = () =>
  useEquipmentMutation((id: number) =>
    api.delete<void>(`/api/equipment/units/${id}`),
  );
