import type { GridComparisonDto } from '../../../../shared/schemas/compare.schema.ts';
import { formatNumber } from './format.ts';

/**
 * Field values measured over the selection beside each grid's stated
 * IEC 60627 values, labelled as such, with the note that says why they
 * differ.
 */
export function FieldVsStatedTable({
  grids,
  note,
}: {
  grids: GridComparisonDto[];
  note: string;
}) {
  const stated = grids.filter((g) => g.fieldVsStated.length > 0);
  return (
    <section
      aria-label="Field and stated values"
      className="space-y-3 rounded-xl bg-white p-5 shadow-sm"
    >
      <h2 className="text-lg font-semibold text-lamina-950">
        Field values beside stated IEC 60627 values
      </h2>
      <p className="text-sm text-slate-600">{note}</p>
      {stated.length === 0 && (
        <p className="text-sm text-slate-500">
          No grid in this selection has stated IEC 60627 figures in the
          register.
        </p>
      )}
      {stated.map((g) => (
        <div key={g.grid.id} className="overflow-x-auto">
          <h3 className="text-sm font-semibold text-slate-800">
            {g.grid.label}
            {g.grid.ratio ? ` · ${g.grid.ratio}:1` : ''}
          </h3>
          <table className="mt-2 w-full text-left text-sm">
            <thead className="text-xs text-slate-500">
              <tr>
                <th className="py-1 pr-4 font-semibold">Figure</th>
                <th className="py-1 pr-4 text-right font-semibold">
                  Field value
                </th>
                <th className="py-1 pr-4 text-right font-semibold">95 % CI</th>
                <th className="py-1 pr-4 text-right font-semibold">
                  Conditions
                </th>
                <th className="py-1 pr-4 text-right font-semibold">
                  Stated value (IEC 60627)
                </th>
                <th className="py-1 text-right font-semibold">Difference</th>
              </tr>
            </thead>
            <tbody>
              {g.fieldVsStated.map((row) => (
                <tr key={row.figure} className="border-t border-slate-100">
                  <td className="py-1 pr-4">
                    {row.label} ({row.symbol})
                  </td>
                  <td className="py-1 pr-4 text-right tabular-nums">
                    {formatNumber(row.field?.value)}
                  </td>
                  <td className="py-1 pr-4 text-right tabular-nums">
                    {row.field
                      ? `${formatNumber(row.field.ciLow)} to ${formatNumber(row.field.ciHigh)}`
                      : '—'}
                  </td>
                  <td className="py-1 pr-4 text-right tabular-nums">
                    {row.field?.n ?? 0}
                  </td>
                  <td className="py-1 pr-4 text-right tabular-nums">
                    {formatNumber(row.statedValue)}
                  </td>
                  <td className="py-1 text-right tabular-nums">
                    {row.differencePercent === null
                      ? '—'
                      : `${row.differencePercent.toFixed(1)} %`}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
          {g.grid.statedFiguresNote && (
            <p className="mt-1 text-xs text-slate-500">
              Stated figures: {g.grid.statedFiguresNote}
            </p>
          )}
        </div>
      ))}
    </section>
  );
}
