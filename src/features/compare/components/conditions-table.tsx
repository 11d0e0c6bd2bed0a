import type { ReactNode } from 'react';
import type { CompareConditionDto } from '../../../../shared/schemas/compare.schema.ts';
import { day, formatNumber, withInterval } from './format.ts';

const OUTCOME_TONES: Record<string, string> = {
  benefit: 'text-lamina-800',
  'no-measurable-benefit': 'text-slate-700',
  cost: 'text-caution-900',
};

function BaselineCell({ condition }: { condition: CompareConditionDto }) {
  const b = condition.baseline;
  if (!b) return <span className="text-slate-400">—</span>;
  if (b.isSource) {
    return <span className="font-semibold text-lamina-800">Baseline</span>;
  }
  const outside = b.flags.filter((f) => f.status === 'outside');
  if (outside.length === 0) {
    return <span className="text-lamina-800">Within tolerance</span>;
  }
  return (
    <span
      className="font-semibold text-caution-900"
      data-testid="baseline-flag"
    >
      Outside:{' '}
      {outside
        .map(
          (f) =>
            `${f.figure.replaceAll('_', ' ')} ${formatNumber(f.measured)} vs ${formatNumber(f.baselineValue)} ±${f.tolerancePercent} %`,
        )
        .join('; ')}
    </span>
  );
}

/** Predicted figures from the grid's construction beside the measured ones. */
function PredictedBeside({ condition }: { condition: CompareConditionDto }) {
  const p = condition.predicted!;
  const f = condition.figures;
  const withSpr = p.withMeasuredSpr;
  const pairs: Array<[string, number | undefined, number | null]> = [
    ['Tp', f.primary_transmission?.value, p.primaryTransmission],
    ['Ts', f.scatter_transmission?.value, p.scatterTransmission],
    ['Σ', f.selectivity?.value, p.selectivity],
    [
      'K',
      f.contrast_improvement_factor?.value,
      withSpr?.contrastImprovementFactor ?? null,
    ],
    ['B', f.bucky_factor?.value, withSpr?.buckyFactor ?? null],
    [
      'SIF',
      f.snr_improvement_factor?.value,
      withSpr?.snrImprovementFactor ?? null,
    ],
  ];
  return (
    <details className="text-xs text-slate-600">
      <summary className="cursor-pointer">
        Field values beside values predicted from the grid’s construction
      </summary>
      <p className="mt-1 tabular-nums">
        {pairs
          .map(
            ([symbol, field, predicted]) =>
              `${symbol} ${formatNumber(field)} (field) / ${formatNumber(predicted)} (predicted)`,
          )
          .join(' · ')}
      </p>
      <p className="mt-1">
        {withSpr
          ? `K, B and SIF use the measured SPR ${formatNumber(withSpr.scatterToPrimaryRatio)}. `
          : 'K, B and SIF need an SPR measured with a beam stop. '}
        {p.assumptions}
      </p>
    </details>
  );
}

/**
 * Every listed condition with its main figures and 95 % intervals, the
 * predicted Tp beside the measured one, the verdict with its cautions and
 * the baseline flags. `actions` adds controls per row (e.g. set baseline).
 */
export function ConditionsTable({
  conditions,
  total,
  actions,
}: {
  conditions: CompareConditionDto[];
  total: number;
  actions?: (condition: CompareConditionDto) => ReactNode;
}) {
  return (
    <section aria-label="Conditions" className="space-y-2">
      <p className="text-sm text-slate-600">
        {total} matching condition{total === 1 ? '' : 's'}
        {conditions.length < total
          ? `; the latest ${conditions.length} are listed (the charts and counts use all)`
          : ''}
        .
      </p>
      <div className="overflow-x-auto rounded-xl bg-white shadow-sm">
        <table
          className="w-full text-left text-sm"
          data-testid="conditions-table"
        >
          <thead className="bg-slate-50 text-xs text-slate-500">
            <tr>
              <th className="px-3 py-2 font-semibold">Study</th>
              <th className="px-3 py-2 font-semibold">Room · grid</th>
              <th className="px-3 py-2 font-semibold">Beam · phantom</th>
              <th className="px-3 py-2 text-right font-semibold">
                SIF [95 % CI]
              </th>
              <th className="px-3 py-2 text-right font-semibold">
                CIF [95 % CI]
              </th>
              <th className="px-3 py-2 text-right font-semibold">
                Bucky factor
              </th>
              <th className="px-3 py-2 text-right font-semibold">
                Tp field / predicted
              </th>
              <th className="px-3 py-2 font-semibold">Baseline</th>
              {actions && <th className="px-3 py-2" />}
            </tr>
          </thead>
          {conditions.map((c) => (
            <tbody key={c.conditionId} className="border-t border-slate-200">
              <tr>
                <td className="px-3 pt-2 align-top">
                  <div className="font-semibold text-lamina-950">
                    {c.study.title}
                  </div>
                  <div className="text-xs text-slate-500">
                    {day(c.study.date)} · rev. {c.study.revision}
                    {c.study.status !== 'signed' && (
                      <span className="ml-1 rounded bg-caution-100 px-1 font-semibold text-caution-900">
                        {c.study.status.toUpperCase()}
                      </span>
                    )}
                  </div>
                </td>
                <td className="px-3 pt-2 align-top">
                  {c.room.name}
                  <div className="text-xs text-slate-500">
                    {c.grid.label}
                    {c.grid.ratio ? ` (${c.grid.ratio}:1)` : ''}
                  </div>
                </td>
                <td className="px-3 pt-2 align-top">
                  {c.kvp} kV ({c.filtration})
                  <div className="text-xs text-slate-500">
                    {c.phantomThicknessCm} cm{' '}
                    {c.phantomMaterial?.toUpperCase() ?? ''}
                  </div>
                </td>
                <td className="px-3 pt-2 text-right align-top tabular-nums">
                  {withInterval(c.figures.snr_improvement_factor)}
                </td>
                <td className="px-3 pt-2 text-right align-top tabular-nums">
                  {withInterval(c.figures.contrast_improvement_factor)}
                </td>
                <td className="px-3 pt-2 text-right align-top tabular-nums">
                  {withInterval(c.figures.bucky_factor)}
                </td>
                <td className="px-3 pt-2 text-right align-top tabular-nums">
                  {formatNumber(c.figures.primary_transmission?.value)} /{' '}
                  {formatNumber(c.predicted?.primaryTransmission)}
                </td>
                <td className="px-3 pt-2 align-top text-xs">
                  <BaselineCell condition={c} />
                </td>
                {actions && (
                  <td className="px-3 pt-2 text-right align-top">
                    {actions(c)}
                  </td>
                )}
              </tr>
              <tr>
                <td colSpan={actions ? 9 : 8} className="px-3 pb-3 pt-1">
                  <p
                    className={`text-sm ${OUTCOME_TONES[c.verdict.outcome ?? ''] ?? 'text-slate-600'}`}
                  >
                    {c.verdict.sentence}
                  </p>
                  <p className="text-xs text-caution-700">
                    {c.cautions.join(' ')}
                  </p>
                  {c.predicted && <PredictedBeside condition={c} />}
                  {c.warnings.length > 0 && (
                    <details className="text-xs text-slate-600">
                      <summary className="cursor-pointer">
                        {c.warnings.length} trust warning
                        {c.warnings.length === 1 ? '' : 's'}
                      </summary>
                      <ul className="list-disc pl-5">
                        {c.warnings.map((w) => (
                          <li key={`${w.code}-${w.message}`}>{w.message}</li>
                        ))}
                      </ul>
                    </details>
                  )}
                </td>
              </tr>
            </tbody>
          ))}
        </table>
      </div>
    </section>
  );
}
