import { useState, type FormEvent } from 'react';
import type { CalibrationModel } from '../../../../shared/analysis/detector-calibration.ts';
import { checkCalibrationFit } from '../../../../shared/schemas/equipment-rules.ts';
import { Button } from '../../../components/ui/button.tsx';
import { TextField } from '../../../components/ui/field.tsx';
import { FormError } from '../../../components/ui/form-error.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { useCreateCalibration } from '../api/detectors.ts';
import { CalibrationChart } from './calibration-chart.tsx';
import { MODEL_LABELS, modelEquation } from './calibration-curve.ts';
import { formatNumber, parseNumberField } from './format.ts';

interface PointRow {
  key: number;
  kerma: string;
  pixelValue: string;
}

const emptyRows = (count: number, from = 0): PointRow[] =>
  Array.from({ length: count }, (_, i) => ({
    key: from + i,
    kerma: '',
    pixelValue: '',
  }));

/** Rows with both numbers typed; blank rows are ignored. */
function readPoints(rows: PointRow[]) {
  const filled = rows.filter(
    (r) => r.kerma.trim() !== '' || r.pixelValue.trim() !== '',
  );
  const points = filled.map((r) => ({
    airKermaUgy: parseNumberField(r.kerma) ?? Number.NaN,
    meanPixelValue: parseNumberField(r.pixelValue) ?? Number.NaN,
  }));
  const complete = points.every(
    (p) => Number.isFinite(p.airKermaUgy) && Number.isFinite(p.meanPixelValue),
  );
  return { points, complete };
}

/**
 * Records a calibration: flat-field points typed into a table, the three
 * fits shown as soon as there are three points, and the model to use.
 */
export function CalibrationForm({
  detectorId,
  onDone,
}: {
  detectorId: number;
  onDone?: () => void;
}) {
  const create = useCreateCalibration(detectorId);
  const [calibratedOn, setCalibratedOn] = useState('');
  const [beamQualityNote, setBeamQualityNote] = useState('');
  const [notes, setNotes] = useState('');
  const [rows, setRows] = useState<PointRow[]>(() => emptyRows(5));
  const [model, setModel] = useState<CalibrationModel | null>(null);
  const error = create.error instanceof ApiError ? create.error : null;

  const { points, complete } = readPoints(rows);
  const check =
    complete && points.length >= 3 ? checkCalibrationFit(points) : null;
  const chosen = check?.result
    ? (check.result.fits.find((fit) => fit.model === model) ??
      check.result.chosen)
    : null;

  const setRow = (key: number, change: Partial<PointRow>) =>
    setRows((previous) =>
      previous.map((row) => (row.key === key ? { ...row, ...change } : row)),
    );

  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    create.mutate(
      {
        calibratedOn,
        beamQualityNote,
        points,
        notes,
        ...(model ? { model } : {}),
      },
      { onSuccess: () => onDone?.() },
    );
  };

  return (
    <form
      onSubmit={handleSubmit}
      noValidate
      aria-label="Record a calibration"
      className="space-y-5 rounded-xl bg-white p-5 shadow-sm"
    >
      <div className="grid gap-4 md:grid-cols-2">
        <TextField
          label="Calibration date"
          type="date"
          value={calibratedOn}
          onChange={(e) => setCalibratedOn(e.target.value)}
          error={error?.fieldMessage('calibratedOn')}
        />
        <TextField
          label="Beam quality"
          value={beamQualityNote}
          onChange={(e) => setBeamQualityNote(e.target.value)}
          error={error?.fieldMessage('beamQualityNote')}
          hint="e.g. RQA5, 70 kV with 21 mm Al added; air kerma at the detector plane"
        />
      </div>
      <fieldset>
        <legend className="mb-2 font-semibold text-lamina-900">
          Flat-field points
        </legend>
        <table className="w-full max-w-xl text-sm">
          <thead className="text-left text-slate-600">
            <tr>
              <th className="py-1">Detector air kerma (µGy)</th>
              <th className="py-1">Mean pixel value</th>
              <th className="py-1">
                <span className="sr-only">Remove</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {rows.map((row, i) => (
              <tr key={row.key}>
                <td className="py-1 pr-2">
                  <input
                    aria-label={`Air kerma of point ${i + 1} (µGy)`}
                    inputMode="decimal"
                    className="w-full rounded border border-slate-300 px-2 py-1"
                    value={row.kerma}
                    onChange={(e) => setRow(row.key, { kerma: e.target.value })}
                  />
                </td>
                <td className="py-1 pr-2">
                  <input
                    aria-label={`Mean pixel value of point ${i + 1}`}
                    inputMode="decimal"
                    className="w-full rounded border border-slate-300 px-2 py-1"
                    value={row.pixelValue}
                    onChange={(e) =>
                      setRow(row.key, { pixelValue: e.target.value })
                    }
                  />
                </td>
                <td className="py-1">
                  <Button
                    variant="quiet"
                    aria-label={`Remove point ${i + 1}`}
                    onClick={() =>
                      setRows((previous) =>
                        previous.filter((r) => r.key !== row.key),
                      )
                    }
                  >
                    ×
                  </Button>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
        <Button
          variant="secondary"
          className="mt-2"
          onClick={() =>
            setRows((previous) => [
              ...previous,
              ...emptyRows(1, Math.max(0, ...previous.map((r) => r.key)) + 1),
            ])
          }
        >
          Add point
        </Button>
        {!complete && (
          <p className="mt-2 text-xs text-red-700">
            Each point needs two numbers.
          </p>
        )}
        {error?.details
          .filter((d) => d.path.startsWith('points'))
          .map((d) => (
            <p key={d.path} role="alert" className="mt-2 text-xs text-red-700">
              {d.path === 'points'
                ? d.message
                : `${d.path.replace('points.', 'Point ')}: ${d.message}`}
            </p>
          ))}
      </fieldset>

      {check?.problems.map((p) => (
        <p key={p.path} role="alert" className="text-sm text-red-700">
          {p.message}
        </p>
      ))}
      {check?.result && chosen && (
        <fieldset className="space-y-3">
          <legend className="font-semibold text-lamina-900">Fits</legend>
          <table className="w-full text-sm">
            <thead className="text-left text-slate-600">
              <tr>
                <th className="py-1">Use</th>
                <th className="py-1">Model</th>
                <th className="py-1">Fitted function</th>
                <th className="py-1">R²</th>
                <th className="py-1">Residual SD (PV)</th>
              </tr>
            </thead>
            <tbody>
              {check.result.fits.map((fit) => (
                <tr
                  key={fit.model}
                  className="border-t border-slate-100"
                  data-testid={`fit-${fit.model}`}
                >
                  <td className="py-1">
                    <input
                      type="radio"
                      name="calibration-model"
                      aria-label={`Use the ${fit.model} model`}
                      checked={chosen.model === fit.model}
                      onChange={() => setModel(fit.model)}
                    />
                  </td>
                  <td className="py-1">
                    {MODEL_LABELS[fit.model]}
                    {fit.model === check.result.chosen.model && ' (best R²)'}
                  </td>
                  <td className="py-1 font-mono text-xs">
                    {modelEquation(fit)}
                  </td>
                  <td className="py-1">{fit.rSquared.toFixed(6)}</td>
                  <td className="py-1">{formatNumber(fit.residualSd, 3)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <CalibrationChart
            points={points}
            fit={chosen}
            label={`The flat-field points with the ${chosen.model} fit`}
          />
        </fieldset>
      )}
      <TextField
        label="Calibration notes"
        value={notes}
        onChange={(e) => setNotes(e.target.value)}
        error={error?.fieldMessage('notes')}
      />
      <FormError error={error} />
      <Button type="submit" disabled={create.isPending || !check?.result}>
        Record calibration
      </Button>
    </form>
  );
}
