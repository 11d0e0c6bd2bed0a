import { useState } from 'react';
import { Button } from '../../../components/ui/button.tsx';
import { ErrorNotice } from '../../../components/ui/page-state.tsx';
import { useApplyLayout } from '../api/layouts.ts';

const SOURCE_WORDS = {
  applied: 'as drawn',
  auto_shift: 'followed the phantom',
  manual: 'set by hand',
};

/**
 * Applies the study's layout to every image of the study, optionally
 * following the phantom (automatic shift by cross-correlation), and shows
 * where it went on each image.
 */
export function ApplyPanel({
  studyId,
  hasLayout,
  imageNames,
}: {
  studyId: number;
  hasLayout: boolean;
  imageNames: ReadonlyMap<number, string>;
}) {
  const [autoShift, setAutoShift] = useState(true);
  const apply = useApplyLayout(studyId);
  return (
    <div className="space-y-3">
      <label className="flex items-center gap-2 text-sm text-slate-700">
        <input
          type="checkbox"
          checked={autoShift}
          onChange={(e) => setAutoShift(e.target.checked)}
        />
        Follow the phantom on each image (automatic shift)
      </label>
      <Button
        onClick={() => apply.mutate({ autoShift, minConfidence: 0.3 })}
        disabled={!hasLayout || apply.isPending}
      >
        {apply.isPending ? 'Applying…' : 'Apply to every image of the study'}
      </Button>
      {!hasLayout && (
        <p className="text-xs text-slate-500">Save the study's layout first.</p>
      )}
      {apply.error && <ErrorNotice error={apply.error} />}
      {apply.data && (
        <div
          role="status"
          data-testid="apply-result"
          className="space-y-2 text-sm"
        >
          <p className="text-lamina-800">
            Applied to {apply.data.placements.length} images; results are being
            recomputed.
          </p>
          <table className="w-full text-left text-xs">
            <thead className="text-slate-500">
              <tr>
                <th className="py-1">Image</th>
                <th>Offset (px)</th>
                <th>How</th>
              </tr>
            </thead>
            <tbody>
              {apply.data.placements.map((p) => (
                <tr key={p.imageId} className="border-t border-slate-100">
                  <td className="py-1">
                    {imageNames.get(p.imageId) ?? `image ${p.imageId}`}
                  </td>
                  <td className="font-mono">
                    {p.dxPx.toFixed(1)}, {p.dyPx.toFixed(1)}
                  </td>
                  <td>
                    {SOURCE_WORDS[p.source]}
                    {p.confidence !== null
                      ? ` (correlation ${p.confidence.toFixed(2)})`
                      : ''}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
          {apply.data.warnings.map((w) => (
            <p key={w.message} className="text-caution-800">
              {w.message}
            </p>
          ))}
        </div>
      )}
    </div>
  );
}
