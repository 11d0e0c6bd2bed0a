import { useState } from 'react';
import type { FigureKey } from '../../../../shared/figures.ts';
import { figureDefinition } from '../../../../shared/figures.ts';
import type { BaselineDto } from '../../../../shared/schemas/compare.schema.ts';
import { Button } from '../../../components/ui/button.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { useDeleteBaseline, useUpdateBaseline } from '../api/baselines.ts';

const format = (v: number) => Number(v.toPrecision(4)).toString();

/**
 * A baseline: its source, figures and tolerances; physicists edit the
 * tolerances, retire or delete it.
 */
export function BaselineCard({
  baseline,
  onChanged,
}: {
  baseline: BaselineDto;
  onChanged?: () => void;
}) {
  const [edits, setEdits] = useState<Partial<Record<FigureKey, string>>>({});
  const update = useUpdateBaseline(() => {
    setEdits({});
    onChanged?.();
  });
  const remove = useDeleteBaseline(onChanged);
  const figures = Object.entries(baseline.figures) as Array<
    [FigureKey, NonNullable<BaselineDto['figures'][FigureKey]>]
  >;
  const changed = Object.keys(edits).length > 0;
  const handleSave = () =>
    update.mutate({
      id: baseline.id,
      change: {
        tolerances: Object.fromEntries(
          Object.entries(edits).map(([k, v]) => [k, Number(v)]),
        ),
      },
    });
  const error = update.error ?? remove.error;
  return (
    <div
      className="space-y-2 rounded-lg border border-lamina-200 bg-white p-4"
      data-testid="baseline-card"
    >
      <p className="text-sm">
        <span className="font-semibold text-lamina-950">
          Baseline from “{baseline.source.studyTitle}”
        </span>{' '}
        (revision {baseline.source.revision}), set by{' '}
        {baseline.setBy.displayName} on {baseline.setAt.slice(0, 10)}
        {!baseline.active && (
          <span className="ml-2 rounded bg-slate-100 px-1 text-xs">
            retired
          </span>
        )}
      </p>
      {baseline.note && (
        <p className="text-xs text-slate-600">{baseline.note}</p>
      )}
      <table className="w-full text-sm">
        <thead className="text-xs text-slate-500">
          <tr>
            <th className="text-left font-semibold">Figure</th>
            <th className="text-right font-semibold">Baseline</th>
            <th className="text-right font-semibold">Tolerance ± %</th>
          </tr>
        </thead>
        <tbody>
          {figures.map(([key, f]) => (
            <tr key={key} className="border-t border-slate-100">
              <td>{figureDefinition(key).label}</td>
              <td className="text-right tabular-nums">{format(f.value)}</td>
              <td className="text-right">
                {baseline.permissions.edit ? (
                  <input
                    aria-label={`Tolerance for ${figureDefinition(key).label}`}
                    type="number"
                    className="w-20 rounded border border-slate-300 px-1 text-right"
                    value={edits[key] ?? String(baseline.tolerances[key] ?? 10)}
                    onChange={(e) =>
                      setEdits((d) => ({ ...d, [key]: e.target.value }))
                    }
                  />
                ) : (
                  (baseline.tolerances[key] ?? 10)
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="text-xs text-slate-500">{baseline.policyNote}</p>
      {error instanceof ApiError && (
        <p role="alert" className="text-xs text-red-700">
          {error.message}
        </p>
      )}
      {(baseline.permissions.edit || baseline.permissions.delete) && (
        <div className="flex flex-wrap justify-end gap-2">
          {baseline.permissions.edit && (
            <>
              <Button
                variant="quiet"
                onClick={() =>
                  update.mutate({ id: baseline.id, change: { active: false } })
                }
              >
                Retire
              </Button>
              <Button
                onClick={handleSave}
                disabled={!changed || update.isPending}
              >
                Save tolerances
              </Button>
            </>
          )}
          {baseline.permissions.delete && (
            <Button variant="danger" onClick={() => remove.mutate(baseline.id)}>
              Delete
            </Button>
          )}
        </div>
      )}
    </div>
  );
}
