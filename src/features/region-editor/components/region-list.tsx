import {
  REGION_ROLES,
  type RegionRole,
} from '../../../../shared/analysis/region-layout.ts';
import { formatRegionSpec } from '../../../../shared/roi/region-geometry.ts';
import type {
  ObjectFiguresView,
  RegionStatsView,
} from '../hooks/use-region-stats.ts';
import { roundRegion, type EditorRegion } from '../model/editor-regions.ts';

const ROLE_NAMES: Record<RegionRole, string> = {
  object: 'object',
  background: 'background',
  'beam-stop': 'beam stop',
};

const number = (v: number) =>
  Math.abs(v) >= 1000
    ? v.toFixed(0)
    : Math.abs(v) >= 10
      ? v.toFixed(1)
      : v.toPrecision(3);

function Stats({ view }: { view: RegionStatsView | undefined }) {
  if (!view) return null;
  if (view.error) return <p className="text-xs text-red-700">{view.error}</p>;
  const s = view.stats!;
  return (
    <p className="font-mono text-xs text-slate-700">
      n {s.n} · mean {number(s.mean)} · SD {number(s.sampleSd)} · min{' '}
      {number(s.min)} · max {number(s.max)}
      {view.warnings.map((w) => (
        <span key={w.code} className="block font-sans text-caution-800">
          {w.message}
        </span>
      ))}
    </p>
  );
}

/**
 * The regions being edited, with their name, role, the background an
 * object is measured against, and live statistics of the stored values.
 */
export function RegionList({
  regions,
  selectedKey,
  stats,
  objects,
  isEditable,
  onSelect,
  onChange,
  onDelete,
}: {
  regions: readonly EditorRegion[];
  selectedKey: string | null;
  stats: Map<string, RegionStatsView>;
  objects: Map<string, ObjectFiguresView>;
  isEditable: boolean;
  onSelect: (key: string) => void;
  onChange: (key: string, change: Partial<EditorRegion>) => void;
  onDelete: (key: string) => void;
}) {
  const backgrounds = regions.filter((r) => r.role === 'background');
  return (
    <ul className="space-y-2" aria-label="Regions">
      {regions.map((r) => {
        const figures = objects.get(r.key);
        return (
          <li
            key={r.key}
            data-testid={`region-row-${r.name}`}
            className={`rounded-lg border p-3 ${r.key === selectedKey ? 'border-lamina-500 bg-lamina-50' : 'border-slate-200 bg-white'}`}
            onClick={() => onSelect(r.key)}
          >
            <div className="flex flex-wrap items-center gap-2">
              <label className="sr-only" htmlFor={`name-${r.key}`}>
                Name
              </label>
              <input
                id={`name-${r.key}`}
                value={r.name}
                disabled={!isEditable}
                onChange={(e) => onChange(r.key, { name: e.target.value })}
                className="w-36 rounded border border-slate-300 px-2 py-1 text-sm"
              />
              <label className="sr-only" htmlFor={`role-${r.key}`}>
                Role
              </label>
              <select
                id={`role-${r.key}`}
                value={r.role}
                disabled={!isEditable}
                onChange={(e) =>
                  onChange(r.key, { role: e.target.value as RegionRole })
                }
                className="rounded border border-slate-300 px-2 py-1 text-sm"
              >
                {REGION_ROLES.map((role) => (
                  <option key={role} value={role}>
                    {ROLE_NAMES[role]}
                  </option>
                ))}
              </select>
              {r.role === 'object' && backgrounds.length > 1 && (
                <select
                  aria-label={`Background of ${r.name}`}
                  value={r.background[0] ?? ''}
                  disabled={!isEditable}
                  onChange={(e) =>
                    onChange(r.key, {
                      background: e.target.value ? [e.target.value] : [],
                    })
                  }
                  className="rounded border border-slate-300 px-2 py-1 text-sm"
                >
                  <option value="">against every background</option>
                  {backgrounds.map((b) => (
                    <option key={b.key} value={b.name}>
                      against {b.name}
                    </option>
                  ))}
                </select>
              )}
              {isEditable && (
                <button
                  type="button"
                  className="ml-auto text-xs font-semibold text-red-700 hover:underline"
                  onClick={(e) => {
                    e.stopPropagation();
                    onDelete(r.key);
                  }}
                >
                  Remove
                </button>
              )}
            </div>
            <p className="mt-1 font-mono text-xs text-slate-500">
              {formatRegionSpec(roundRegion(r.region))}
            </p>
            <div data-testid={`stats-${r.name}`}>
              <Stats view={stats.get(r.key)} />
            </div>
            {figures && (
              <p
                data-testid={`figures-${r.name}`}
                className="mt-1 text-xs text-lamina-900"
              >
                contrast {(figures.contrast * 100).toFixed(2)} % · CNR{' '}
                {figures.cnr.toFixed(2)} against {figures.against.join(', ')}{' '}
                (stored values)
              </p>
            )}
          </li>
        );
      })}
    </ul>
  );
}
