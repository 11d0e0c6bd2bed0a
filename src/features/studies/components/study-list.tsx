import { Link } from 'react-router-dom';
import type { StudySummaryDto } from '../../../../shared/studies/study-dto.ts';
import { StudyStatusBadge } from './study-status-badge.tsx';

const day = (iso: string) =>
  new Date(iso).toLocaleDateString('en-GB', { dateStyle: 'medium' });

/** Studies as a table: title, room, state, author, exposures, last change. */
export function StudyList({ studies }: { studies: StudySummaryDto[] }) {
  return (
    <div className="overflow-x-auto rounded-xl bg-white shadow-sm">
      <table className="min-w-full text-left text-sm">
        <thead className="border-b border-slate-200 text-xs uppercase tracking-wide text-slate-500">
          <tr>
            <th className="px-4 py-3">Study</th>
            <th className="px-4 py-3">Room</th>
            <th className="px-4 py-3">State</th>
            <th className="px-4 py-3">Prepared by</th>
            <th className="px-4 py-3 text-right">Exposures</th>
            <th className="px-4 py-3">Changed</th>
          </tr>
        </thead>
        <tbody>
          {studies.map((s) => (
            <tr
              key={s.id}
              className="border-b border-slate-100 last:border-0"
              data-testid={`study-row-${s.id}`}
            >
              <td className="px-4 py-3">
                <Link
                  to={`/studies/${s.id}`}
                  className="font-semibold text-lamina-800 hover:underline"
                >
                  {s.title}
                </Link>
                {s.revision > 1 && (
                  <span className="ml-2 text-xs text-slate-500">
                    revision {s.revision}
                  </span>
                )}
              </td>
              <td className="px-4 py-3 text-slate-700">{s.room.name}</td>
              <td className="px-4 py-3">
                <StudyStatusBadge status={s.status} />
              </td>
              <td className="px-4 py-3 text-slate-700">
                {s.createdBy.displayName}
              </td>
              <td className="px-4 py-3 text-right tabular-nums">
                {s.expectedAcquisitionCount}
              </td>
              <td className="px-4 py-3 text-slate-600">{day(s.updatedAt)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
