import { useState } from 'react';
import type { RegionLayout } from '../../../../shared/analysis/region-layout.ts';
import { Button } from '../../../components/ui/button.tsx';
import { TextField } from '../../../components/ui/field.tsx';
import { ErrorNotice } from '../../../components/ui/page-state.tsx';
import { useFindObjects } from '../api/layouts.ts';

/** Finds circular contrast objects on the server and proposes regions for them. */
export function FindObjectsPanel({
  imageId,
  onProposed,
}: {
  imageId: number;
  onProposed: (regions: RegionLayout['regions']) => void;
}) {
  const [minRadius, setMinRadius] = useState('5');
  const find = useFindObjects(imageId);
  const handleFind = () => {
    const minRadiusPx = Number(minRadius);
    find.mutate(
      {
        minRadiusPx:
          Number.isFinite(minRadiusPx) && minRadiusPx >= 1 ? minRadiusPx : 3,
      },
      { onSuccess: (found) => onProposed(found.regions) },
    );
  };
  return (
    <div className="space-y-2">
      <div className="flex items-end gap-2">
        <div className="w-40">
          <TextField
            label="Smallest radius (px)"
            type="number"
            min={1}
            value={minRadius}
            onChange={(e) => setMinRadius(e.target.value)}
          />
        </div>
        <Button
          variant="secondary"
          onClick={handleFind}
          disabled={find.isPending}
        >
          {find.isPending ? 'Searching…' : 'Find objects'}
        </Button>
      </div>
      {find.error && <ErrorNotice error={find.error} />}
      {find.data && (
        <p role="status" className="text-sm text-slate-700">
          {find.data.objects.length === 0
            ? 'No circular object was found; draw the regions by hand.'
            : `Proposed ${find.data.objects.length} object(s), each with a background ring: check them before saving.`}
          {find.data.warnings.map((w) => (
            <span key={w.message} className="block text-caution-800">
              {w.message}
            </span>
          ))}
        </p>
      )}
    </div>
  );
}
