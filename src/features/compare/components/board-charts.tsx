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
import type { ChartDto } from '../../../../shared/schemas/compare.schema.ts';

interface Point {
  x: number;
  y: number;
  n: number;
  /** Distances from y down to the interval's low end and up to its high end. */
  error: [number, number];
}

const format = (v: number) => Number(v.toPrecision(4));

/**
 * One board chart: each group a line of points with 95 % error bars, the
 * dashed line at the reference (1: no change).
 */
function BoardChart({ chart }: { chart: ChartDto }) {
  const groups = chart.groups.map((g) => ({
    ...g,
    points: g.points.map((p): Point => ({
      x: p.x,
      y: p.y,
      n: p.n,
      error: [p.y - p.low, p.high - p.y],
    })),
  }));
  const empty = groups.every((g) => g.points.length === 0);
  return (
    <figure
      aria-label={chart.title}
      data-testid={`board-chart-${chart.id}`}
      className="h-80 w-full rounded-xl bg-white p-4 shadow-sm"
    >
      <figcaption className="text-sm font-semibold text-lamina-950">
        {chart.title}
      </figcaption>
      {empty ? (
        <p className="py-16 text-center text-sm text-slate-500">
          No condition of this selection has this figure.
        </p>
      ) : (
        <ResponsiveContainer width="100%" height="88%">
          <LineChart margin={{ top: 8, right: 16, bottom: 24, left: 8 }}>
            <CartesianGrid stroke="#e2e8f0" />
            <XAxis
              type="number"
              dataKey="x"
              domain={['dataMin - 2', 'dataMax + 2']}
              allowDuplicatedCategory={false}
              label={{
                value: chart.xLabel,
                position: 'insideBottom',
                offset: -12,
              }}
            />
            <YAxis
              width={56}
              domain={['auto', 'auto']}
              label={{
                value: chart.yLabel,
                angle: -90,
                position: 'insideLeft',
              }}
            />
            <Tooltip
              formatter={(value, _name, item) => [
                `${format(Number(value))} (n = ${(item.payload as Point).n})`,
                chart.yLabel,
              ]}
            />
            <Legend verticalAlign="top" />
            {chart.reference !== null && (
              <ReferenceLine
                y={chart.reference}
                stroke="#94a3b8"
                strokeDasharray="4 4"
              />
            )}
            {groups.map((g, i) => (
              <Line
                key={g.key}
                data={g.points}
                dataKey="y"
                name={g.label}
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
      )}
    </figure>
  );
}

/** Every chart of the board, two to a row on wide screens. */
export function BoardCharts({
  charts,
  note,
}: {
  charts: ChartDto[];
  note: string;
}) {
  return (
    <section aria-label="Charts" className="space-y-3">
      <div className="grid gap-4 lg:grid-cols-2">
        {charts.map((chart) => (
          <BoardChart key={chart.id} chart={chart} />
        ))}
      </div>
      <p className="text-xs text-slate-500">{note}</p>
    </section>
  );
}
