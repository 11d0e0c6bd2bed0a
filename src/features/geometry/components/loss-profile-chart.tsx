import {
  CartesianGrid,
  Legend,
  Line,
  LineChart,
  ReferenceLine,
  ResponsiveContainer,
  Tooltip,
  XAxis,
  YAxis,
} from 'recharts';
import type { LossProfilePoint } from '../../../../shared/physics/focused-grid.ts';

/**
 * Primary relative to an aligned grid, and the fraction lost, across the
 * field; the criterion line marks the focusing-range limit at the edge.
 */
export function LossProfileChart({
  profile,
  criterion,
}: {
  profile: readonly LossProfilePoint[];
  criterion: number;
}) {
  const data = profile.map((point) => ({
    positionCm: Number(point.positionCm.toFixed(3)),
    relativePrimary: Number(point.relativePrimary.toFixed(4)),
    lossFraction: Number(point.lossFraction.toFixed(4)),
  }));
  return (
    <figure
      aria-label="Relative primary and loss across the field"
      className="h-80 w-full rounded-xl bg-white p-4 shadow-sm"
      data-testid="loss-profile-chart"
    >
      <ResponsiveContainer width="100%" height="100%">
        <LineChart
          data={data}
          margin={{ top: 8, right: 16, bottom: 24, left: 8 }}
        >
          <CartesianGrid stroke="#e2e8f0" />
          <XAxis
            type="number"
            dataKey="positionCm"
            domain={['dataMin', 'dataMax']}
            label={{
              value: 'Position across the strips (cm from the centre line)',
              position: 'insideBottom',
              offset: -12,
            }}
          />
          <YAxis
            domain={[0, 1]}
            width={56}
            label={{ value: 'Fraction', angle: -90, position: 'insideLeft' }}
          />
          <Tooltip />
          <Legend verticalAlign="top" />
          <ReferenceLine
            y={criterion}
            stroke="#e08a0b"
            strokeDasharray="4 4"
            label={{
              value: `criterion ${criterion}`,
              position: 'insideTopRight',
            }}
          />
          <Line
            dataKey="relativePrimary"
            name="Relative primary"
            stroke="#215553"
            strokeWidth={2}
            dot={false}
            isAnimationActive={false}
          />
          <Line
            dataKey="lossFraction"
            name="Fraction lost"
            stroke="#b91c1c"
            strokeWidth={2}
            dot={false}
            isAnimationActive={false}
          />
        </LineChart>
      </ResponsiveContainer>
    </figure>
  );
}
