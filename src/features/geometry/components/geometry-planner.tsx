import { ApiError } from '../../../lib/api-client.ts';
import { usePlanGeometry } from '../api/plan-geometry.ts';
import { LossProfileChart } from './loss-profile-chart.tsx';
import { PlanSummary } from './plan-summary.tsx';
import { PlannerForm } from './planner-form.tsx';

/** The focused-grid planner: inputs, the answer in numbers and as a plot. */
export function GeometryPlanner() {
  const plan = usePlanGeometry();
  return (
    <div className="space-y-6">
      <PlannerForm
        onSubmit={(input) => plan.mutate(input)}
        isPending={plan.isPending}
        error={plan.error instanceof ApiError ? plan.error : null}
      />
      {plan.isError && !(plan.error instanceof ApiError) && (
        <p role="alert" className="text-sm text-red-700">
          The plan could not be made.
        </p>
      )}
      {plan.isIdle && (
        <p className="text-sm text-slate-500">
          Enter a grid and its set-up, then choose Plan.
        </p>
      )}
      {plan.data && (
        <>
          <PlanSummary plan={plan.data} />
          <LossProfileChart
            profile={plan.data.profile}
            criterion={plan.data.focusingRange.criterion}
          />
        </>
      )}
    </div>
  );
}
