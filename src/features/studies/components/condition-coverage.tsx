import type { Arm } from '../../../../shared/schemas/study.schema.ts';
import { ARM_NAMES } from '../../../../shared/studies/condition-label.ts';
import type { StudyConditionDto } from '../../../../shared/studies/study-dto.ts';
import { Button } from '../../../components/ui/button.tsx';
import type { PairingDraft } from './pairing-draft.ts';

interface ConditionCoverageProps {
  conditions: StudyConditionDto[];
  draft: PairingDraft;
  replicates: number;
  /** Set while an image is selected: offers to move it into an arm. */
  onMoveHere?: (place: { conditionId: number; arm: Arm }) => void;
}

/** Each condition's two arms: images placed against replicates planned. */
export function ConditionCoverage({
  conditions,
  draft,
  replicates,
  onMoveHere,
}: ConditionCoverageProps) {
  const count = (conditionId: number, arm: Arm) =>
    Object.values(draft).filter(
      (a) => a && a.conditionId === conditionId && a.arm === arm,
    ).length;
  return (
    <table
      className="min-w-full text-left text-sm"
      aria-label="Condition coverage"
    >
      <thead className="border-b border-slate-200 text-xs uppercase tracking-wide text-slate-500">
        <tr>
          <th className="px-3 py-2">Condition</th>
          {(['grid', 'no_grid'] as const).map((arm) => (
            <th key={arm} className="px-3 py-2">
              {ARM_NAMES[arm]}
            </th>
          ))}
        </tr>
      </thead>
      <tbody>
        {conditions.map((c) => (
          <tr
            key={c.id}
            className="border-b border-slate-100"
            data-testid={`coverage-${c.id}`}
          >
            <td className="px-3 py-2">{c.label}</td>
            {(['grid', 'no_grid'] as const).map((arm) => {
              const have = count(c.id, arm);
              const tone =
                have === replicates
                  ? 'text-lamina-800'
                  : have > replicates
                    ? 'text-red-700'
                    : 'text-caution-900';
              return (
                <td key={arm} className="px-3 py-2">
                  <span className={`font-semibold tabular-nums ${tone}`}>
                    {have} / {replicates}
                  </span>
                  {onMoveHere && (
                    <Button
                      variant="quiet"
                      className="ml-2 px-2 py-0.5 text-xs"
                      onClick={() => onMoveHere({ conditionId: c.id, arm })}
                    >
                      Move here
                    </Button>
                  )}
                </td>
              );
            })}
          </tr>
        ))}
      </tbody>
    </table>
  );
}
