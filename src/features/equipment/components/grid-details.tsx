import type { ReactNode } from 'react';
import type { GridDto } from '../../../../shared/schemas/equipment.schema.ts';
import { formatNumber, materialName } from './format.ts';
import { CONSTRUCTION_VALUES, GridValue } from './grid-value.tsx';

function Item({ term, children }: { term: string; children: ReactNode }) {
  return (
    <div className="border-t border-slate-100 py-2">
      <dt className="text-xs font-semibold text-slate-500">{term}</dt>
      <dd className="mt-0.5 text-slate-900">{children}</dd>
    </div>
  );
}

/** The maker's IEC 60627 figures, shown to three significant digits. */
const STATED_FIGURES = [
  ['statedTp', 'Primary transmission Tp'],
  ['statedTs', 'Scatter transmission Ts'],
  ['statedContrastImprovementFactor', 'Contrast improvement factor K'],
  ['statedBuckyFactor', 'Bucky factor B'],
  ['statedSelectivity', 'Selectivity Σ'],
] as const satisfies readonly (readonly [keyof GridDto, string])[];

const focusRange = (grid: GridDto): string =>
  grid.focusRangeMinCm === null && grid.focusRangeMaxCm === null
    ? 'not stated'
    : `${formatNumber(grid.focusRangeMinCm)}–${formatNumber(grid.focusRangeMaxCm)} cm`;

/** Everything recorded about a grid, derived values marked. */
export function GridDetails({
  grid,
  roomName,
}: {
  grid: GridDto;
  roomName: string;
}) {
  const hasStated = STATED_FIGURES.some(([key]) => grid[key] !== null);
  return (
    <div className="grid gap-6 md:grid-cols-2">
      <section
        aria-labelledby="construction-heading"
        className="rounded-xl bg-white p-5 shadow-sm"
      >
        <h2
          id="construction-heading"
          className="mb-2 font-semibold text-lamina-900"
        >
          Construction
        </h2>
        <dl>
          <Item term="Room">{roomName}</Item>
          {CONSTRUCTION_VALUES.map(({ quantity, term }) => (
            <Item key={quantity} term={term}>
              <GridValue grid={grid} quantity={quantity} />
            </Item>
          ))}
          <Item term="Materials (strip / interspace / cover)">
            {materialName(grid.stripMaterial)} /{' '}
            {materialName(grid.interspaceMaterial)} /{' '}
            {materialName(grid.coverMaterial)}
          </Item>
          <Item term="Focusing distance f0">
            {grid.focusDistanceCm === null
              ? 'none (parallel grid)'
              : `${formatNumber(grid.focusDistanceCm)} cm`}
          </Item>
          <Item term="Focusing range">{focusRange(grid)}</Item>
          <Item term="Serial number">{grid.serial ?? '–'}</Item>
        </dl>
      </section>
      <section
        aria-labelledby="stated-heading"
        className="rounded-xl bg-white p-5 shadow-sm"
      >
        <h2 id="stated-heading" className="mb-2 font-semibold text-lamina-900">
          Stated IEC 60627 figures
        </h2>
        {hasStated ? (
          <>
            <p className="text-xs text-slate-500">
              As stated by the maker under IEC 60627 laboratory conditions;
              these are not field values measured here.
            </p>
            <dl>
              {STATED_FIGURES.map(([key, term]) => (
                <Item key={key} term={term}>
                  {formatNumber(grid[key], 3)}
                </Item>
              ))}
              <Item term="Source">{grid.statedFiguresNote ?? '–'}</Item>
            </dl>
          </>
        ) : (
          <p className="text-sm text-slate-500">
            The maker's figures have not been entered.
          </p>
        )}
        {grid.notes && (
          <p className="mt-4 text-sm text-slate-700">{grid.notes}</p>
        )}
      </section>
      {grid.warnings.length > 0 && (
        <ul
          aria-label="Warnings about this grid"
          className="space-y-1 rounded-lg border border-caution-500/40 bg-caution-50 p-4 text-sm text-caution-900 md:col-span-2"
        >
          {grid.warnings.map((w) => (
            <li key={w.message}>{w.message}</li>
          ))}
        </ul>
      )}
    </div>
  );
}
