import type {
  ConditionResultDto,
  FigureDto,
  VerdictDto,
} from '../../../../shared/schemas/results.schema.ts';
import { formatFigure, formatInterval } from './format.ts';

const STATUS_WORDS: Record<ConditionResultDto['status'], string> = {
  not_computed: 'not computed yet',
  queued: 'waiting to be recomputed',
  running: 'being recomputed',
  done: 'computed',
  failed: 'not computed',
};

const VERDICT_STYLES: Record<VerdictDto['outcome'], string> = {
  benefit: 'border-lamina-300 bg-lamina-50 text-lamina-900',
  'no-measurable-benefit': 'border-slate-300 bg-slate-50 text-slate-800',
  cost: 'border-caution-300 bg-caution-50 text-caution-900',
};

const BASIS_WORDS: Record<FigureDto['basis'], string> = {
  replicates: 'replicates',
  'delta-method': 'delta method',
  mixed: 'replicates and delta method',
  stated: 'stated',
};

function FiguresTable({
  figures,
  testId,
}: {
  figures: FigureDto[];
  testId?: string;
}) {
  return (
    <div className="overflow-x-auto">
      <table data-testid={testId} className="w-full text-left text-sm">
        <thead className="text-xs uppercase text-slate-500">
          <tr>
            <th className="py-1 pr-3">Figure</th>
            <th className="pr-3">Value</th>
            <th className="pr-3">95 % interval</th>
            <th className="pr-3">SE</th>
            <th>Uncertainty from</th>
          </tr>
        </thead>
        <tbody>
          {figures.map((f) => (
            <tr
              key={f.key}
              data-testid={`figure-${f.key}`}
              className="border-t border-slate-100"
            >
              <td className="py-1 pr-3">
                <span className="font-semibold">{f.symbol}</span>{' '}
                <span className="text-slate-600">{f.label}</span>
              </td>
              <td className="pr-3 font-mono" data-testid={`value-${f.key}`}>
                {formatFigure(f.value)}
              </td>
              <td className="pr-3 font-mono">
                {formatInterval(f.ciLow, f.ciHigh)}
              </td>
              <td className="pr-3 font-mono">
                {formatFigure(f.standardError)}
              </td>
              <td className="text-xs text-slate-600">
                {BASIS_WORDS[f.basis]}, n = {f.n}
                {f.degreesOfFreedom !== null
                  ? `, ν = ${f.degreesOfFreedom.toFixed(1)}`
                  : ''}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/** One condition: verdict, every figure with its interval, method and warnings. */
export function ConditionResultCard({
  condition,
}: {
  condition: ConditionResultDto;
}) {
  const c = condition;
  return (
    <article
      aria-label={c.label}
      data-testid={`condition-${c.kvp}-${c.phantomThicknessCm}`}
      className="space-y-3 rounded-xl bg-white p-5 shadow-sm"
    >
      <header className="flex flex-wrap items-baseline justify-between gap-2">
        <h3 className="text-base font-semibold text-lamina-950">{c.label}</h3>
        <p className="text-xs text-slate-500">
          {c.imageCounts.grid} image(s) with grid, {c.imageCounts.noGrid}{' '}
          without · {STATUS_WORDS[c.status]}
          {c.computedAt ? ` · ${new Date(c.computedAt).toLocaleString()}` : ''}
        </p>
      </header>
      {c.error && (
        <p
          role="alert"
          className="rounded-lg border border-red-200 bg-red-50 p-3 text-sm text-red-800"
        >
          {c.error.message}
        </p>
      )}
      {c.verdict && (
        <p
          data-testid="verdict"
          className={`rounded-lg border p-3 text-sm font-semibold ${VERDICT_STYLES[c.verdict.outcome]}`}
        >
          {c.verdict.sentence}
        </p>
      )}
      {c.figures.length > 0 && (
        <>
          <p className="text-xs text-slate-500">
            Object &lsquo;{c.primaryObject}&rsquo;
          </p>
          <FiguresTable figures={c.figures} testId="figures" />
        </>
      )}
      {c.objects.slice(1).map((o) => (
        <details key={o.name}>
          <summary className="cursor-pointer text-sm text-lamina-800">
            Object &lsquo;{o.name}&rsquo; against {o.backgrounds.join(', ')}
          </summary>
          {o.verdict && <p className="my-2 text-sm">{o.verdict.sentence}</p>}
          <FiguresTable figures={o.figures} />
        </details>
      ))}
      {c.method && (
        <dl className="grid gap-x-4 gap-y-1 text-xs text-slate-600 sm:grid-cols-[max-content_1fr]">
          <dt className="font-semibold">Signal</dt>
          <dd>{c.method.signal.join('; ')}</dd>
          <dt className="font-semibold">CNR</dt>
          <dd>{c.method.cnr}</dd>
          <dt className="font-semibold">Noise, trend</dt>
          <dd>
            {c.method.noise === 'region'
              ? 'SD in the region'
              : 'difference of replicates ÷ √2'}
            ;{' '}
            {c.method.detrend === 'plane'
              ? 'background plane removed'
              : 'no trend removal'}
          </dd>
          <dt className="font-semibold">SIF</dt>
          <dd>{c.method.snrImprovementFactor}</dd>
          <dt className="font-semibold">Transmissions</dt>
          <dd>{c.method.transmissions}</dd>
          <dt className="font-semibold">Uncertainty</dt>
          <dd>{c.method.uncertainty}</dd>
          <dt className="font-semibold">Calibration</dt>
          <dd>
            {c.method.calibration
              ? `${c.method.calibration.model} fit of ${c.method.calibration.calibratedOn} (R² ${c.method.calibration.rSquared.toFixed(5)})`
              : 'none recorded for the detector: stored values used'}
          </dd>
          <dt className="font-semibold">Layout</dt>
          <dd>{c.method.layoutName}</dd>
        </dl>
      )}
      {c.warnings.length > 0 && (
        <ul
          aria-label="Warnings"
          className="space-y-1 text-xs text-caution-900"
        >
          {c.warnings.map((w) => (
            <li
              key={`${w.code}-${w.message}`}
              className="rounded bg-caution-50 px-2 py-1"
            >
              {w.message}
            </li>
          ))}
        </ul>
      )}
    </article>
  );
}
