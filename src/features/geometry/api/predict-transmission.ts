import { useMutation } from '@tanstack/react-query';
import type {
  PredictedFiguresDto,
  TransmissionRequestInput,
} from '../../../../shared/schemas/geometry-api.schema.ts';
import { api } from '../../../lib/api-client.ts';

/** Predicts Tp, Ts and the grid figures (a calculation; nothing is saved). */
export const predictTransmission = (input: TransmissionRequestInput) =>
  api.post<PredictedFiguresDto>('/api/geometry/transmission', input);

export const usePredictTransmission = () =>
  useMutation({ mutationFn: predictTransmission });
