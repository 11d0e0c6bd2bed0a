import { queryOptions, useQuery } from '@tanstack/react-query';
import type {
  CreateGridInput,
  GridDto,
  UpdateGridInput,
} from '../../../../shared/schemas/equipment.schema.ts';
import { api } from '../../../lib/api-client.ts';
import { equipmentKeys } from './equipment-keys.ts';
import { useEquipmentMutation } from './rooms.ts';

export const gridsQueryOptions = queryOptions({
  queryKey: equipmentKeys.grids(),
  queryFn: () => api.get<GridDto[]>('/api/equipment/grids'),
});

export const gridQueryOptions = (id: number) =>
  queryOptions({
    queryKey: equipmentKeys.grid(id),
    queryFn: () => api.get<GridDto>(`/api/equipment/grids/${id}`),
  });

export const useGrids = () => useQuery(gridsQueryOptions);
export const useGrid = (id: number) => useQuery(gridQueryOptions(id));

export const useCreateGrid = () =>
  useEquipmentMutation((input: CreateGridInput) =>
    api.post<GridDto>('/api/equipment/grids', input),
  );

export const useUpdateGrid = (id: number) =>
  useEquipmentMutation((input: UpdateGridInput) =>
    api.patch<GridDto>(`/api/equipment/grids/${id}`, input),
  );

export const useDeleteGrid = () =>
  useEquipmentMutation((id: number) =>
    api.delete<void>(`/api/equipment/grids/${id}`),
  );
