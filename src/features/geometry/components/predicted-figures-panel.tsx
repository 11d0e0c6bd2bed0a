import type { PredictedFiguresDto } from '../../../../shared/schemas/geometry-api.schema.ts';
import { formatNumber } from './format.ts';
import { WarningList } from './warning-list.tsx';

/** Figures a measurement may supply beside the prediction. */
export interface MeasuredFigures {
  primaryTransmission?: number | null;
  scatterTransmission?: number | null;
  totalTransmission?: number | null;
  contrastImprovementFactor?: number | null;
  buckyFactor?: number | null;
  selectivity?: number | null;
  snrImprovementFactor?: number | null;
  imageImprovementFactor?: number | null;
}

const ROWS: { key: keyof MeasuredFigures; label: string }[] = [
  { key: 'primaryTransmission', label: 'Primary transmission Tp' },
  { key: 'scatterTransmission', label: 'Scatter transmission Ts' },
  { key: 'totalTransmission', label: 'Total transmission Tt' },
  { key: 'contrastImprovementFactor', label: 'Contrast improvement factor K' },
  { key: 'buckyFactor', label: 'Bucky factor B' },
  { key: 'selectivity', label: 'Selectivity Σ' },
  { key: 'snrImprovementFactor', label: 'SNR improvement factor SIF' },
  { key: 'imageImprovementFactor', label: 'Image improvement factor Q' },
];

function predictedValue(p: PredictedFiguresDto, key: keyof MeasuredFigures) {
  if (key === 'primaryTransmission') return p.primaryTransmission;
  if (key === 'scatterTransmission') return p.scatterTransmission;
  return p.figures[key];
}

/**
 * Predicted Tp, Ts, Tt, K, B, Σ, SIF and Q of a grid, with the measured
 * values beside them when given, and every assumption behind the prediction
 * (SPR, beam, scatter model, construction) spelled out.
 */
export function PredictedFiguresPanel({
  prediction,
  measured,
  measuredLabel = 'Measured (field value)',
  title = 'Predicted figures',
}: {
  prediction: PredictedFiguresDto;
  measured?: MeasuredFigures;
  measuredLabel?: string;
  title?: string;
}) {
  const c = prediction.construction;
  const a = prediction.assumptions;
  return (
    <section
      aria-label={title}
      className="space-y-3 rounded-xl bg-white p-6 shadow-sm"
      data-testid="predicted-figures"
    >
      <h3 className="text-lg font-semibold text-lamina-950">{title}</h3>
      <table className="w-full text-sm">
        <thead>
          <tr className="text-left text-xs uppercase text-slate-500">
            <th className="py-1 font-semibold">Figure</th>
            <th className="py-1 text-right font-semibold">Predicted</th>
            {measured && (
              <th className="py-1 text-right font-semibold">{measuredLabel}</th>
            )}
          </tr>
        </thead>
        <tbody>
          {ROWS.map((row) => (
            <tr key={row.key} className="border-t border-slate-100">
              <th scope="row" className="py-1 text-left font-normal">
                {row.label}
              </th>
              <td
                className="py-1 text-right tabular-nums"
                data-testid={`predicted-${row.key}`}
              >
                {formatNumber(predictedValue(prediction, row.key))}
              </td>
              {measured && (
                <td className="py-1 text-right tabular-nums">
                  {formatNumber(measured[row.key])}
                </td>
              )}
            </tr>
          ))}
        </tbody>
      </table>
      <ul className="list-disc space-y-1 pl-5 text-xs text-slate-600">
        <li>
          Tt, K, B, SIF and Q assume a scatter-to-primary ratio of{' '}
          {a.scatterToPrimaryRatio} without the grid (assumed, not measured).
        </li>
        <li>Beam: {prediction.beam.description}.</li>
        <li>Scatter model: {a.scatterModel}.</li>
        <li>
          Grid{prediction.grid ? ` ${prediction.grid.label}` : ''}: r{' '}
          {formatNumber(c.ratio)}, {formatNumber(c.stripFrequencyPerCm)}{' '}
          lines/cm, h {formatNumber(c.stripHeightUm)} µm, D{' '}
          {formatNumber(c.interspaceWidthUm)} µm, t{' '}
          {formatNumber(c.stripThicknessUm)} µm; {a.stripMaterial} strips,{' '}
          {a.interspaceMaterial} interspace;{' '}
          {prediction.coverPlates.length === 0
            ? 'no cover plates included'
            : `cover ${prediction.coverPlates.map((p) => `${p.thicknessUm} µm ${p.material}`).join(' + ')}`}
          .
        </li>
        <li>
          Attenuation from NIST SRD 126 (Hubbell &amp; Seltzer); Tp = open
          fraction × interspace attenuation + septal transmission.
        </li>
      </ul>
      <WarningList warnings={prediction.warnings} />
    </section>
  );
}
