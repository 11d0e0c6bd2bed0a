import { useMutation } from '@tanstack/react-query';
import type {
  GeometryPlanDto,
  PlanRequestInput,
} from '../../../../shared/schemas/geometry-api.schema.ts';
import { api } from '../../../lib/api-client.ts';

/** Plans a focused-grid set-up (a calculation; nothing is saved). */
export const planGeometry = (input: PlanRequestInput) =>
  api.post<GeometryPlanDto>('/api/geometry/plan', input);

export const usePlanGeometry = () => useMutation({ mutationFn: planGeometry });
