import {
  CartesianGrid,
  ErrorBar,
  Line,
  LineChart,
  ReferenceArea,
  ReferenceLine,
  ResponsiveContainer,
  Tooltip,
  XAxis,
  YAxis,
} from 'recharts';
import type { TrendSeriesDto } from '../../../../shared/schemas/compare.schema.ts';

interface Point {
  time: number;
  value: number;
  error: [number, number];
  outside: boolean;
  study: string;
}

const day = (time: number) => new Date(time).toISOString().slice(0, 10);
const format = (v: number) => Number(v.toPrecision(4));

function Dot(props: { cx?: number; cy?: number; payload?: Point }) {
  const { cx, cy, payload } = props;
  if (cx === undefined || cy === undefined || !payload) return null;
  return (
    <circle
      cx={cx}
      cy={cy}
      r={payload.outside ? 6 : 4}
      fill={payload.outside ? '#b91c1c' : '#215553'}
      stroke="white"
      strokeWidth={1}
      data-outside={payload.outside ? 'true' : undefined}
    />
  );
}

/**
 * One figure of one condition match over time: each signed study's value
 * with its 95 % interval, the baseline and its tolerance band shaded;
 * points outside the band are drawn larger in red.
 */
export function TrendChart({ series }: { series: TrendSeriesDto }) {
  const points: Point[] = series.points.map((p) => ({
    time: Date.parse(p.date),
    value: p.value,
    error: [p.value - p.ciLow, p.ciHigh - p.value],
    outside: p.flag?.status === 'outside',
    study: p.studyTitle,
  }));
  const band = series.band;
  return (
    <figure
      aria-label={`${series.label} over time`}
      data-testid={`trend-${series.figure}`}
      className="h-64 w-full rounded-lg bg-white p-3 ring-1 ring-slate-200"
    >
      <figcaption className="text-sm font-semibold text-lamina-950">
        {series.label} ({series.symbol})
        {band && (
          <span className="ml-2 text-xs font-normal text-slate-500">
            baseline {format(band.baselineValue)} ± {band.tolerancePercent} %
          </span>
        )}
      </figcaption>
      <ResponsiveContainer width="100%" height="88%">
        <LineChart
          data={points}
          margin={{ top: 8, right: 16, bottom: 8, left: 8 }}
        >
          <CartesianGrid stroke="#e2e8f0" />
          <XAxis
            type="number"
            dataKey="time"
            scale="time"
            domain={['dataMin - 86400000', 'dataMax + 86400000']}
            tickFormatter={day}
          />
          <YAxis width={56} domain={['auto', 'auto']} />
          <Tooltip
            labelFormatter={(t) => day(Number(t))}
            formatter={(v, _n, item) => [
              format(Number(v)),
              (item.payload as Point).study,
            ]}
          />
          {band && (
            <ReferenceArea
              y1={band.low}
              y2={band.high}
              fill="#79bdb8"
              fillOpacity={0.25}
              stroke="none"
              ifOverflow="extendDomain"
            />
          )}
          {band && (
            <ReferenceLine
              y={band.baselineValue}
              stroke="#215553"
              strokeDasharray="4 4"
            />
          )}
          <Line
            dataKey="value"
            stroke="#33837f"
            strokeWidth={2}
            dot={<Dot />}
            isAnimationActive={false}
          >
            <ErrorBar
              dataKey="error"
              width={5}
              stroke="#64748b"
              isAnimationActive={false}
            />
          </Line>
        </LineChart>
      </ResponsiveContainer>
    </figure>
  );
}
