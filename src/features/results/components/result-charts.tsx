import {
  CartesianGrid,
  ErrorBar,
  Legend,
  Line,
  LineChart,
  ReferenceLine,
  ResponsiveContainer,
  Tooltip,
  XAxis,
  YAxis,
} from 'recharts';
import { seriesColour } from '../../../components/ui/chart-palette.ts';
import type { FigureKey } from '../../../../shared/figures.ts';
import type { ConditionResultDto } from '../../../../shared/schemas/results.schema.ts';

interface Point {
  kvp: number;
  value: number;
  /** Distances from the value down to the interval's low end and up to its high end. */
  error: [number, number];
}

function seriesOf(conditions: readonly ConditionResultDto[], key: FigureKey) {
  const byThickness = new Map<number, Point[]>();
  for (const c of conditions) {
    const f = c.figures.find((x) => x.key === key);
    if (!f) continue;
    const list = byThickness.get(c.phantomThicknessCm) ?? [];
    list.push({
      kvp: c.kvp,
      value: f.value,
      error: [f.value - f.ciLow, f.ciHigh - f.value],
    });
    byThickness.set(c.phantomThicknessCm, list);
  }
  return [...byThickness.entries()]
    .sort(([a], [b]) => a - b)
    .map(([thickness, points]) => ({
      thickness,
      points: points.sort((a, b) => a.kvp - b.kvp),
    }));
}

function FigureChart({
  conditions,
  figure,
  title,
}: {
  conditions: readonly ConditionResultDto[];
  figure: FigureKey;
  title: string;
}) {
  const series = seriesOf(conditions, figure);
  if (series.length === 0) return null;
  const kvs = [
    ...new Set(series.flatMap((s) => s.points.map((p) => p.kvp))),
  ].sort((a, b) => a - b);
  return (
    <figure
      aria-label={title}
      data-testid={`chart-${figure}`}
      className="h-72 w-full rounded-xl bg-white p-4 shadow-sm"
    >
      <figcaption className="text-sm font-semibold text-lamina-950">
        {title}
      </figcaption>
      <ResponsiveContainer width="100%" height="90%">
        <LineChart margin={{ top: 8, right: 16, bottom: 24, left: 8 }}>
          <CartesianGrid stroke="#e2e8f0" />
          <XAxis
            type="number"
            dataKey="kvp"
            domain={['dataMin - 5', 'dataMax + 5']}
            ticks={kvs}
            allowDuplicatedCategory={false}
            label={{
              value: 'Tube voltage (kV)',
              position: 'insideBottom',
              offset: -12,
            }}
          />
          <YAxis width={56} domain={['auto', 'auto']} />
          <Tooltip />
          <Legend verticalAlign="top" />
          <ReferenceLine y={1} stroke="#94a3b8" strokeDasharray="4 4" />
          {series.map((s, i) => (
            <Line
              key={s.thickness}
              data={s.points}
              dataKey="value"
              name={`${s.thickness} cm`}
              stroke={seriesColour(i)}
              strokeWidth={2}
              isAnimationActive={false}
            >
              <ErrorBar
                dataKey="error"
                width={6}
                stroke={seriesColour(i)}
                isAnimationActive={false}
              />
            </Line>
          ))}
        </LineChart>
      </ResponsiveContainer>
    </figure>
  );
}

/**
 * CIF and the SNR improvement factor at equal dose against kV, one line per
 * phantom thickness, with 95 % intervals as error bars; the dashed line at
 * 1 marks "no change".
 */
export function ResultCharts({
  conditions,
}: {
  conditions: readonly ConditionResultDto[];
}) {
  return (
    <div className="grid gap-4 lg:grid-cols-2">
      <FigureChart
        conditions={conditions}
        figure="contrast_improvement_factor"
        title="Contrast improvement factor"
      />
      <FigureChart
        conditions={conditions}
        figure="snr_improvement_factor"
        title="SNR improvement factor at equal dose"
      />
    </div>
  );
}
