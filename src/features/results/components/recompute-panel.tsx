import { useState } from 'react';
import type { AnalysisSettings } from '../../../../shared/schemas/results.schema.ts';
import { Button } from '../../../components/ui/button.tsx';
import { SelectField } from '../../../components/ui/field.tsx';
import { ErrorNotice } from '../../../components/ui/page-state.tsx';
import { useRecompute } from '../api/results.ts';

const CHOICES: {
  [K in keyof AnalysisSettings]: {
    label: string;
    options: Array<[AnalysisSettings[K], string]>;
  };
} = {
  cnrDefinition: {
    label: 'CNR definition',
    options: [
      ['background-sd', '(S_bg − S_obj) / σ_bg'],
      ['pooled-sd', '(S_bg − S_obj) / pooled σ'],
    ],
  },
  detrend: {
    label: 'Background trend (heel effect)',
    options: [
      ['none', 'not removed'],
      ['plane', 'plane fitted and removed'],
    ],
  },
  noise: {
    label: 'Noise',
    options: [
      ['region', 'SD in the region'],
      ['replicate-difference', 'difference of replicates ÷ √2'],
    ],
  },
  doseMeasure: {
    label: 'Dose measure D',
    options: [
      ['mas', 'tube exposure (mAs)'],
      ['dap', 'dose–area product'],
      ['entrance', 'entrance dose'],
    ],
  },
};

/** The analysis settings of the study and a button to recompute with them. */
export function RecomputePanel({
  studyId,
  settings,
  canRecompute,
}: {
  studyId: number;
  settings: AnalysisSettings;
  canRecompute: boolean;
}) {
  const [draft, setDraft] = useState(settings);
  const recompute = useRecompute(studyId);
  const fields = Object.keys(CHOICES) as Array<keyof AnalysisSettings>;
  return (
    <div className="space-y-3">
      <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
        {fields.map((field) => (
          <SelectField
            key={field}
            label={CHOICES[field].label}
            value={draft[field]}
            disabled={!canRecompute}
            onChange={(e) => setDraft({ ...draft, [field]: e.target.value })}
          >
            {CHOICES[field].options.map(([value, text]) => (
              <option key={value} value={value}>
                {text}
              </option>
            ))}
          </SelectField>
        ))}
      </div>
      {canRecompute && (
        <Button
          onClick={() => recompute.mutate(draft)}
          disabled={recompute.isPending}
        >
          Recompute the study
        </Button>
      )}
      {recompute.error && <ErrorNotice error={recompute.error} />}
    </div>
  );
}
