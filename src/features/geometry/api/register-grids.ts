import { queryOptions, useQuery } from '@tanstack/react-query';
import type { GridDto } from '../../../../shared/schemas/equipment.schema.ts';
import { api } from '../../../lib/api-client.ts';
import { geometryKeys } from './geometry-keys.ts';

/** The register's grids, for the planner's and predictor's grid pickers. */
export const registerGridsQueryOptions = queryOptions({
  queryKey: geometryKeys.registerGrids(),
  queryFn: () => api.get<GridDto[]>('/api/equipment/grids'),
});

export const useRegisterGrids = () => useQuery(registerGridsQueryOptions);
