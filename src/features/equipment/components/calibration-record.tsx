import type { DetectorCalibrationDto } from '../../../../shared/schemas/equipment.schema.ts';
import { Button } from '../../../components/ui/button.tsx';
import { ErrorNotice } from '../../../components/ui/page-state.tsx';
import { useDeleteCalibration } from '../api/detectors.ts';
import { CalibrationChart } from './calibration-chart.tsx';
import { MODEL_LABELS, modelEquation } from './calibration-curve.ts';
import { formatNumber } from './format.ts';

/** One calibration record: chosen fit, R², chart and residuals. */
export function CalibrationRecord({
  calibration,
}: {
  calibration: DetectorCalibrationDto;
}) {
  const remove = useDeleteCalibration(calibration.detectorId);
  const chosen = {
    model: calibration.model,
    a: calibration.parameters.a,
    b: calibration.parameters.b,
  };
  return (
    <article
      aria-labelledby={`calibration-${calibration.id}`}
      className="space-y-4 rounded-xl bg-white p-5 shadow-sm"
      data-testid="calibration-record"
    >
      <header className="flex flex-wrap items-start justify-between gap-3">
        <div>
          <h3
            id={`calibration-${calibration.id}`}
            className="font-semibold text-lamina-950"
          >
            Calibration of {calibration.calibratedOn}
          </h3>
          <p className="text-sm text-slate-600">
            {calibration.beamQualityNote}
          </p>
        </div>
        {calibration.permissions.delete && (
          <Button
            variant="quiet"
            disabled={remove.isPending}
            onClick={() => {
              if (
                window.confirm(
                  `Delete the calibration of ${calibration.calibratedOn}?`,
                )
              ) {
                remove.mutate(calibration.id);
              }
            }}
          >
            Delete record
          </Button>
        )}
      </header>
      {remove.isError && <ErrorNotice error={remove.error} />}
      <dl className="grid gap-3 text-sm md:grid-cols-4">
        <div>
          <dt className="text-xs font-semibold uppercase text-slate-500">
            Model in use
          </dt>
          <dd>
            {MODEL_LABELS[calibration.model]} (
            {calibration.modelChoice === 'requested' ? 'chosen' : 'best R²'})
          </dd>
        </div>
        <div>
          <dt className="text-xs font-semibold uppercase text-slate-500">
            Fitted function
          </dt>
          <dd className="font-mono text-xs">{modelEquation(chosen)}</dd>
        </div>
        <div>
          <dt className="text-xs font-semibold uppercase text-slate-500">R²</dt>
          <dd data-testid="calibration-r-squared">
            {calibration.rSquared.toFixed(6)}
          </dd>
        </div>
        <div>
          <dt className="text-xs font-semibold uppercase text-slate-500">
            Residual SD (PV)
          </dt>
          <dd>{formatNumber(calibration.residualSd, 3)}</dd>
        </div>
      </dl>
      <CalibrationChart
        points={calibration.points}
        fit={{ ...chosen, rSquared: calibration.rSquared }}
        label={`Mean pixel value against detector air kerma, ${calibration.calibratedOn}, with the ${MODEL_LABELS[calibration.model].toLowerCase()} fit`}
      />
      <table className="w-full text-sm">
        <caption className="text-left text-xs font-semibold uppercase text-slate-500">
          Points and residuals
        </caption>
        <thead className="text-left text-slate-600">
          <tr>
            <th className="py-1">Air kerma (µGy)</th>
            <th className="py-1">Mean pixel value</th>
            <th className="py-1">Residual (PV)</th>
          </tr>
        </thead>
        <tbody>
          {calibration.points.map((point, i) => (
            <tr
              key={`${point.airKermaUgy}-${i}`}
              className="border-t border-slate-100"
            >
              <td className="py-1">{formatNumber(point.airKermaUgy)}</td>
              <td className="py-1">{formatNumber(point.meanPixelValue, 6)}</td>
              <td className="py-1">
                {formatNumber(calibration.residuals[i], 3)}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {calibration.notes && (
        <p className="text-sm text-slate-600">{calibration.notes}</p>
      )}
    </article>
  );
}
