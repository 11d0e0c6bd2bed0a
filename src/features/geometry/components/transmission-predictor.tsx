import { ApiError } from '../../../lib/api-client.ts';
import { usePredictTransmission } from '../api/predict-transmission.ts';
import { PredictedFiguresPanel } from './predicted-figures-panel.tsx';
import { TransmissionForm } from './transmission-form.tsx';

/** Predicted transmissions from construction and beam, with assumptions. */
export function TransmissionPredictor() {
  const prediction = usePredictTransmission();
  return (
    <div className="space-y-6">
      <TransmissionForm
        onSubmit={(input) => prediction.mutate(input)}
        isPending={prediction.isPending}
        error={prediction.error instanceof ApiError ? prediction.error : null}
      />
      {prediction.isError && !(prediction.error instanceof ApiError) && (
        <p role="alert" className="text-sm text-red-700">
          The prediction could not be made.
        </p>
      )}
      {prediction.isIdle && (
        <p className="text-sm text-slate-500">
          Enter a construction and a beam, then choose Predict.
        </p>
      )}
      {prediction.data && (
        <PredictedFiguresPanel prediction={prediction.data} />
      )}
    </div>
  );
}
