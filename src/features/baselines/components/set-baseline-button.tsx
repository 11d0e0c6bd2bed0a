import { useState } from 'react';
import { DEFAULT_TOLERANCE_PERCENT } from '../../../../shared/compare/tolerance.ts';
import type { FigureKey } from '../../../../shared/figures.ts';
import { Button } from '../../../components/ui/button.tsx';
import { TextField } from '../../../components/ui/field.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { useCreateBaseline } from '../api/baselines.ts';

/**
 * Marks a signed study's condition as the baseline of its room + grid +
 * beam + phantom, with one tolerance for every figure (editable later per
 * figure). Replaces the match's active baseline.
 */
export function SetBaselineButton({
  conditionId,
  figures,
  label,
  onChanged,
}: {
  conditionId: number;
  /** The figures the condition has; each gets the tolerance entered. */
  figures: FigureKey[];
  label: string;
  onChanged?: () => void;
}) {
  const [isOpen, setOpen] = useState(false);
  const [tolerance, setTolerance] = useState(String(DEFAULT_TOLERANCE_PERCENT));
  const [note, setNote] = useState('');
  const create = useCreateBaseline(() => {
    setOpen(false);
    onChanged?.();
  });
  if (!isOpen) {
    return (
      <Button
        variant="secondary"
        onClick={() => setOpen(true)}
        aria-label={`Set ${label} as baseline`}
      >
        Set as baseline
      </Button>
    );
  }
  const percent = Number(tolerance);
  const handleSave = () =>
    create.mutate({
      conditionId,
      note,
      tolerances: Object.fromEntries(figures.map((key) => [key, percent])),
    });
  return (
    <div className="w-64 space-y-2 rounded-lg border border-lamina-200 bg-lamina-50 p-3 text-left">
      <TextField
        label="Tolerance (± %, local policy)"
        type="number"
        value={tolerance}
        onChange={(e) => setTolerance(e.target.value)}
        hint="For every figure; change them one by one on the room’s trend page."
      />
      <TextField
        label="Note"
        value={note}
        onChange={(e) => setNote(e.target.value)}
      />
      {create.error instanceof ApiError && (
        <p role="alert" className="text-xs text-red-700">
          {create.error.message}
        </p>
      )}
      <div className="flex justify-end gap-2">
        <Button variant="quiet" onClick={() => setOpen(false)}>
          Cancel
        </Button>
        <Button
          onClick={handleSave}
          disabled={create.isPending || !(percent > 0)}
        >
          Save baseline
        </Button>
      </div>
    </div>
  );
}
