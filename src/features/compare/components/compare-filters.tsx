import { useState, type FormEvent } from 'react';
import type { CompareOptionsDto } from '../../../../shared/schemas/compare.schema.ts';
import { Button } from '../../../components/ui/button.tsx';
import { TextField } from '../../../components/ui/field.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { EMPTY_FILTERS, type BoardFilters } from '../api/compare-query.ts';

type ListKey = 'rooms' | 'grids' | 'detectors';

function Choices({
  legend,
  items,
  chosen,
  onToggle,
}: {
  legend: string;
  items: Array<{ id: number; label: string }>;
  chosen: string[];
  onToggle: (id: string) => void;
}) {
  return (
    <fieldset className="min-w-0">
      <legend className="text-sm font-semibold text-slate-700">{legend}</legend>
      <div className="mt-1 max-h-36 space-y-1 overflow-y-auto rounded-lg border border-slate-300 bg-white p-2">
        {items.length === 0 && (
          <p className="text-xs text-slate-500">None registered.</p>
        )}
        {items.map((item) => (
          <label key={item.id} className="flex items-center gap-2 text-sm">
            <input
              type="checkbox"
              checked={chosen.includes(String(item.id))}
              onChange={() => onToggle(String(item.id))}
            />
            {item.label}
          </label>
        ))}
      </div>
      <p className="mt-1 text-xs text-slate-500">
        {chosen.length === 0 ? 'All' : `${chosen.length} chosen`}
      </p>
    </fieldset>
  );
}

/**
 * The board's filters: rooms, grids, detectors, kV and thickness ranges,
 * study dates and, for physicists, unsigned studies. Applies on submit.
 */
export function CompareFilters({
  options,
  value,
  error,
  onChange,
}: {
  options: CompareOptionsDto;
  value: BoardFilters;
  error: unknown;
  onChange: (filters: BoardFilters) => void;
}) {
  const [draft, setDraft] = useState(value);
  const set = <K extends keyof BoardFilters>(key: K, v: BoardFilters[K]) =>
    setDraft((d) => ({ ...d, [key]: v }));
  const toggle = (key: ListKey) => (id: string) =>
    setDraft((d) => ({
      ...d,
      [key]: d[key].includes(id)
        ? d[key].filter((x) => x !== id)
        : [...d[key], id],
    }));
  const fieldError = (path: string) =>
    error instanceof ApiError ? error.fieldMessage(path) : undefined;
  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    onChange(draft);
  };
  return (
    <form
      aria-label="Filters"
      onSubmit={handleSubmit}
      className="space-y-4 rounded-xl bg-white p-5 shadow-sm"
    >
      <div className="grid gap-4 md:grid-cols-3">
        <Choices
          legend="Rooms"
          items={options.rooms.map((r) => ({ id: r.id, label: r.name }))}
          chosen={draft.rooms}
          onToggle={toggle('rooms')}
        />
        <Choices
          legend="Grids"
          items={options.grids.map((g) => ({
            id: g.id,
            label: g.ratio ? `${g.label} (${g.ratio}:1)` : g.label,
          }))}
          chosen={draft.grids}
          onToggle={toggle('grids')}
        />
        <Choices
          legend="Detectors"
          items={options.detectors.map((d) => ({ id: d.id, label: d.name }))}
          chosen={draft.detectors}
          onToggle={toggle('detectors')}
        />
      </div>
      <div className="grid gap-4 sm:grid-cols-3 lg:grid-cols-6">
        <TextField
          label="Lowest kV"
          type="number"
          inputMode="decimal"
          value={draft.kvMin}
          error={fieldError('kvMin')}
          onChange={(e) => set('kvMin', e.target.value)}
        />
        <TextField
          label="Highest kV"
          type="number"
          inputMode="decimal"
          value={draft.kvMax}
          error={fieldError('kvMax')}
          onChange={(e) => set('kvMax', e.target.value)}
        />
        <TextField
          label="Thinnest phantom (cm)"
          type="number"
          inputMode="decimal"
          value={draft.thicknessMin}
          error={fieldError('thicknessMin')}
          onChange={(e) => set('thicknessMin', e.target.value)}
        />
        <TextField
          label="Thickest phantom (cm)"
          type="number"
          inputMode="decimal"
          value={draft.thicknessMax}
          error={fieldError('thicknessMax')}
          onChange={(e) => set('thicknessMax', e.target.value)}
        />
        <TextField
          label="Studies from"
          type="date"
          value={draft.from}
          error={fieldError('from')}
          onChange={(e) => set('from', e.target.value)}
        />
        <TextField
          label="Studies to"
          type="date"
          value={draft.to}
          error={fieldError('to')}
          onChange={(e) => set('to', e.target.value)}
        />
      </div>
      <div className="flex flex-wrap items-center gap-4">
        {options.permissions.includeDrafts && (
          <label className="flex items-center gap-2 text-sm">
            <input
              type="checkbox"
              checked={draft.drafts}
              onChange={(e) => set('drafts', e.target.checked)}
            />
            Include unsigned studies (shown marked as drafts)
          </label>
        )}
        <div className="ml-auto flex gap-2">
          <Button
            variant="quiet"
            onClick={() => {
              setDraft(EMPTY_FILTERS);
              onChange(EMPTY_FILTERS);
            }}
          >
            Clear
          </Button>
          <Button type="submit">Show</Button>
        </div>
      </div>
    </form>
  );
}
