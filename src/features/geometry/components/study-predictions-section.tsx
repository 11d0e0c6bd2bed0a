import { useState } from 'react';
import { TextField } from '../../../components/ui/field.tsx';
import {
  Empty,
  ErrorNotice,
  Loading,
} from '../../../components/ui/page-state.tsx';
import { useStudyPredictions } from '../api/study-predictions.ts';
import { parseNumberField } from './format.ts';
import {
  PredictedFiguresPanel,
  type MeasuredFigures,
} from './predicted-figures-panel.tsx';

/** A common assumption when nothing better is known (common practice). */
const DEFAULT_SPR = 4;

/**
 * Predicted grid figures for each condition of a study, beside the measured
 * ones when the page passes them (by condition id). The SPR is the reader's
 * assumption and can be changed.
 */
export function StudyPredictionsSection({
  studyId,
  measuredByCondition,
}: {
  studyId: number;
  measuredByCondition?: Record<number, MeasuredFigures | undefined>;
}) {
  const [sprText, setSprText] = useState(String(DEFAULT_SPR));
  const parsed = parseNumberField(sprText);
  const spr =
    parsed !== undefined && parsed >= 0 && parsed <= 50 ? parsed : DEFAULT_SPR;
  const predictions = useStudyPredictions(studyId, spr);
  return (
    <section aria-label="Predicted figures" className="space-y-4">
      <div className="flex flex-wrap items-end gap-4">
        <h2 className="text-lg font-semibold text-lamina-950">
          Predicted from construction
        </h2>
        <div className="w-56">
          <TextField
            label="Scatter-to-primary ratio (assumed)"
            inputMode="decimal"
            value={sprText}
            onChange={(e) => setSprText(e.target.value)}
            error={
              spr !== parsed ? `Using ${DEFAULT_SPR}; enter 0–50.` : undefined
            }
          />
        </div>
      </div>
      <p className="text-sm text-slate-600">
        Predicted from each grid’s construction and NIST attenuation data for
        the condition’s beam through its phantom. Measured values beside them
        are field values from this study’s images, not IEC 60627 values.
      </p>
      {predictions.isPending && <Loading what="the predicted figures" />}
      {predictions.isError && (
        <ErrorNotice
          error={predictions.error}
          onRetry={() => void predictions.refetch()}
        />
      )}
      {predictions.data && predictions.data.conditions.length === 0 && (
        <Empty>This study has no conditions to predict.</Empty>
      )}
      {predictions.data && (
        <div className="grid gap-4 lg:grid-cols-2">
          {predictions.data.conditions.map((entry) =>
            entry.prediction ? (
              <PredictedFiguresPanel
                key={entry.conditionId}
                title={entry.conditionLabel}
                prediction={entry.prediction}
                measured={measuredByCondition?.[entry.conditionId]}
              />
            ) : (
              <div
                key={entry.conditionId}
                className="rounded-xl bg-white p-6 text-sm text-slate-600 shadow-sm"
              >
                <p className="font-semibold text-lamina-950">
                  {entry.conditionLabel}
                </p>
                <p className="mt-2">{entry.unavailableReason}</p>
              </div>
            ),
          )}
        </div>
      )}
    </section>
  );
}
