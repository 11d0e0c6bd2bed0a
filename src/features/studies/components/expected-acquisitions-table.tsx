import type { ChecklistStepDto } from '../../../../shared/studies/study-dto.ts';
import { describeFiltration } from '../../../../shared/studies/expected-acquisitions.ts';

const exposureText = (step: ChecklistStepDto) =>
  step.exposure.mode === 'aec'
    ? `AEC (${step.exposure.chamber})`
    : `${step.exposure.exposureMas} mAs`;

/**
 * Every planned exposure in the order to make it. Rows where the grid goes
 * in or out, or the phantom changes, are marked so the change is not missed.
 */
export function ExpectedAcquisitionsTable({
  steps,
  withTicks = false,
}: {
  steps: ChecklistStepDto[];
  withTicks?: boolean;
}) {
  return (
    <table
      className="min-w-full text-left text-sm"
      aria-label="Expected acquisitions"
    >
      <thead className="border-b border-slate-300 text-xs uppercase tracking-wide text-slate-500">
        <tr>
          <th className="px-2 py-2">#</th>
          <th className="px-2 py-2">Phantom</th>
          <th className="px-2 py-2">Grid</th>
          <th className="px-2 py-2">kV</th>
          <th className="px-2 py-2">Added filtration</th>
          <th className="px-2 py-2">Exposure</th>
          <th className="px-2 py-2">Replicate</th>
          {withTicks && <th className="px-2 py-2">Done</th>}
        </tr>
      </thead>
      <tbody>
        {steps.map((step, i) => {
          const previous = steps[i - 1];
          const changes =
            !previous ||
            previous.arm !== step.arm ||
            previous.phantomThicknessCm !== step.phantomThicknessCm ||
            previous.gridId !== step.gridId;
          return (
            <tr
              key={step.step}
              className={`break-inside-avoid border-b border-slate-100 ${changes ? 'border-t-2 border-t-lamina-300' : ''}`}
            >
              <td className="px-2 py-1.5 tabular-nums">{step.step}</td>
              <td className="px-2 py-1.5">{step.phantomThicknessCm} cm</td>
              <td className="px-2 py-1.5">
                {step.arm === 'grid' ? (
                  <span className="font-semibold">{step.gridLabel} in</span>
                ) : (
                  <span className="text-caution-900">grid out</span>
                )}
              </td>
              <td className="px-2 py-1.5 tabular-nums">{step.kvp}</td>
              <td className="px-2 py-1.5">
                {describeFiltration(step.addedFiltration)}
              </td>
              <td className="px-2 py-1.5">{exposureText(step)}</td>
              <td className="px-2 py-1.5 tabular-nums">{step.replicate}</td>
              {withTicks && (
                <td className="px-2 py-1.5">
                  <span
                    aria-hidden
                    className="inline-block h-4 w-4 rounded border border-slate-500"
                  />
                </td>
              )}
            </tr>
          );
        })}
      </tbody>
    </table>
  );
}
