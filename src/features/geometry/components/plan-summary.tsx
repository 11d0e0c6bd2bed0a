import type { GeometryPlanDto } from '../../../../shared/schemas/geometry-api.schema.ts';
import { formatCm, formatFraction } from './format.ts';
import { WarningList } from './warning-list.tsx';

function Fact({
  label,
  value,
  testId,
}: {
  label: string;
  value: string;
  testId: string;
}) {
  return (
    <div className="rounded-lg bg-lamina-50 p-3">
      <dt className="text-xs font-semibold uppercase text-lamina-700">
        {label}
      </dt>
      <dd
        className="mt-1 text-lg font-semibold text-lamina-950"
        data-testid={testId}
      >
        {value}
      </dd>
    </div>
  );
}

/** The planner's answer in numbers: edge loss, focusing range, cut-off. */
export function PlanSummary({ plan }: { plan: GeometryPlanDto }) {
  const range = plan.focusingRange;
  return (
    <section aria-label="Plan result" className="space-y-4">
      <dl className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
        <Fact
          label="Primary loss at the field edge"
          value={formatFraction(plan.edgeLossFraction)}
          testId="edge-loss"
        />
        <Fact
          label="Loss at the centre line"
          value={formatFraction(plan.centreLossFraction)}
          testId="centre-loss"
        />
        <Fact
          label={`Focusing range at ±${range.edgePositionCm} cm`}
          value={`${formatCm(range.nearCm)} – ${formatCm(range.farCm)}`}
          testId="focusing-range"
        />
        <Fact
          label="SID within the range"
          value={plan.isWithinFocusingRange ? 'Yes' : 'No'}
          testId="within-range"
        />
        {plan.upsideDownTotalCutoffCm !== undefined && (
          <Fact
            label="Upside down: total cut-off beyond"
            value={formatCm(plan.upsideDownTotalCutoffCm)}
            testId="upside-down-cutoff"
          />
        )}
      </dl>
      <p className="text-xs text-slate-500">
        Range: focal-spot-to-grid distances at which the field edge keeps at
        least {Math.round(range.criterion * 100)} % of its centred primary (
        {range.criterionSource}). Loss is relative to an aligned grid, in the
        small-angle strip geometry (derived).
        {plan.grid &&
          ` Ratio and focusing distance from the register grid ${plan.grid.label}.`}
      </p>
      <WarningList warnings={plan.warnings} testId="plan-warnings" />
    </section>
  );
}
