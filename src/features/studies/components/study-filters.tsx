import {
  STUDY_STATUSES,
  type ListStudiesQuery,
  type StudyStatus,
} from '../../../../shared/schemas/study.schema.ts';
import { STUDY_STATUS_LABELS } from '../../../../shared/studies/status-labels.ts';
import type { RoomRefDto } from '../../../../shared/studies/study-dto.ts';
import { SelectField } from '../../../components/ui/field.tsx';

interface StudyFiltersProps {
  filters: ListStudiesQuery;
  rooms: RoomRefDto[];
  /** The committee sees signed studies only, so the state filter is hidden. */
  canFilterStatus: boolean;
  onChange: (filters: ListStudiesQuery) => void;
}

export function StudyFilters({
  filters,
  rooms,
  canFilterStatus,
  onChange,
}: StudyFiltersProps) {
  return (
    <div className="grid gap-4 rounded-xl bg-white p-4 shadow-sm sm:grid-cols-3">
      {canFilterStatus && (
        <SelectField
          label="State"
          value={filters.status ?? ''}
          onChange={(e) =>
            onChange({
              ...filters,
              status: (e.target.value || undefined) as StudyStatus | undefined,
            })
          }
        >
          <option value="">Any state</option>
          {STUDY_STATUSES.map((s) => (
            <option key={s} value={s}>
              {STUDY_STATUS_LABELS[s]}
            </option>
          ))}
        </SelectField>
      )}
      <SelectField
        label="Room"
        value={filters.roomId ?? ''}
        onChange={(e) =>
          onChange({
            ...filters,
            roomId: e.target.value ? Number(e.target.value) : undefined,
          })
        }
      >
        <option value="">Any room</option>
        {rooms.map((r) => (
          <option key={r.id} value={r.id}>
            {r.name}
          </option>
        ))}
      </SelectField>
      <label className="flex items-end gap-2 pb-2 text-sm text-slate-700">
        <input
          type="checkbox"
          checked={filters.mine ?? false}
          onChange={(e) =>
            onChange({ ...filters, mine: e.target.checked || undefined })
          }
        />
        Only studies I prepared
      </label>
    </div>
  );
}
