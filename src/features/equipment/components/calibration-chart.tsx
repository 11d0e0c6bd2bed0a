import {
  CartesianGrid,
  ComposedChart,
  Legend,
  Line,
  ResponsiveContainer,
  Scatter,
  Tooltip,
  XAxis,
  YAxis,
} from 'recharts';
import type {
  CalibrationFit,
  CalibrationPoint,
} from '../../../../shared/analysis/detector-calibration.ts';
import { fittedCurve, MODEL_LABELS } from './calibration-curve.ts';

interface CalibrationChartProps {
  points: readonly CalibrationPoint[];
  fit: Pick<CalibrationFit, 'model' | 'a' | 'b' | 'rSquared'>;
  /** Accessible description of the chart. */
  label: string;
}

/** The measured flat-field points and the fitted conversion function. */
export function CalibrationChart({
  points,
  fit,
  label,
}: CalibrationChartProps) {
  return (
    <figure
      aria-label={label}
      className="h-72 w-full"
      data-testid="calibration-chart"
    >
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart margin={{ top: 8, right: 16, bottom: 24, left: 8 }}>
          <CartesianGrid stroke="#e2e8f0" />
          <XAxis
            type="number"
            dataKey="airKermaUgy"
            domain={['auto', 'auto']}
            label={{
              value: 'Detector air kerma K (µGy)',
              position: 'insideBottom',
              offset: -12,
            }}
          />
          <YAxis
            type="number"
            dataKey="meanPixelValue"
            domain={['auto', 'auto']}
            width={64}
            label={{
              value: 'Mean pixel value',
              angle: -90,
              position: 'insideLeft',
            }}
          />
          <Tooltip />
          <Legend verticalAlign="top" />
          <Line
            data={fittedCurve(fit, points)}
            dataKey="meanPixelValue"
            name={`${MODEL_LABELS[fit.model]} fit`}
            stroke="#215553"
            strokeWidth={2}
            dot={false}
            isAnimationActive={false}
          />
          <Scatter
            data={[...points]}
            dataKey="meanPixelValue"
            name="Flat-field points"
            fill="#e08a0b"
            isAnimationActive={false}
          />
        </ComposedChart>
      </ResponsiveContainer>
    </figure>
  );
}
