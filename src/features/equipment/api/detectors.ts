import { queryOptions, useQuery } from '@tanstack/react-query';
import type {
  CreateCalibrationInput,
  CreateDetectorInput,
  DetectorCalibrationDto,
  DetectorDetailDto,
  UpdateDetectorInput,
} from '../../../../shared/schemas/equipment.schema.ts';
import { api } from '../../../lib/api-client.ts';
import { equipmentKeys } from './equipment-keys.ts';
import { useEquipmentMutation } from './rooms.ts';

export const detectorQueryOptions = (id: number) =>
  queryOptions({
    queryKey: equipmentKeys.detector(id),
    queryFn: () => api.get<DetectorDetailDto>(`/api/equipment/detectors/${id}`),
  });

export const useDetector = (id: number) => useQuery(detectorQueryOptions(id));

export const useCreateDetector = () =>
  useEquipmentMutation((input: CreateDetectorInput) =>
    api.post<DetectorDetailDto>('/api/equipment/detectors', input),
  );

export const useUpdateDetector = (id: number) =>
  useEquipmentMutation((input: UpdateDetectorInput) =>
    api.patch<DetectorDetailDto>(`/api/equipment/detectors/${id}`, input),
  );

export const useDeleteDetector = () =>
  useEquipmentMutation((id: number) =>
    api.delete<void>(`/api/equipment/detectors/${id}`),
  );

export const useCreateCalibration = (detectorId: number) =>
  useEquipmentMutation((input: CreateCalibrationInput) =>
    api.post<DetectorCalibrationDto>(
      `/api/equipment/detectors/${detectorId}/calibrations`,
      input,
    ),
  );

export const useDeleteCalibration = (detectorId: number) =>
  useEquipmentMutation((calibrationId: number) =>
    api.delete<void>(
      `/api/equipment/detectors/${detectorId}/calibrations/${calibrationId}`,
    ),
  );
