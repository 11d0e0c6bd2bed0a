import { Link } from 'react-router-dom';
import type {
  RoomStatus,
  RoomSummaryDto,
} from '../../../../shared/schemas/compare.schema.ts';

const STATUS: Record<RoomStatus, { label: string; tone: string }> = {
  'no-signed-study': {
    label: 'No signed study',
    tone: 'bg-slate-100 text-slate-700',
  },
  'no-baseline': {
    label: 'No baseline to check against',
    tone: 'bg-slate-100 text-slate-800',
  },
  'within-tolerance': {
    label: 'Within tolerance',
    tone: 'bg-lamina-100 text-lamina-900',
  },
  'outside-tolerance': {
    label: 'Outside tolerance',
    tone: 'bg-caution-100 text-caution-900',
  },
};

/** The latest signed study of every room against its baselines. */
export function RoomSummaryTable({ rooms }: { rooms: RoomSummaryDto[] }) {
  return (
    <div className="overflow-x-auto rounded-xl bg-white shadow-sm">
      <table className="w-full text-left text-sm" data-testid="room-summary">
        <thead className="bg-slate-50 text-xs text-slate-500">
          <tr>
            <th className="px-3 py-2 font-semibold">Room</th>
            <th className="px-3 py-2 font-semibold">Status</th>
            <th className="px-3 py-2 font-semibold">Latest signed study</th>
            <th className="px-3 py-2 text-right font-semibold">
              Signed studies
            </th>
            <th className="px-3 py-2 text-right font-semibold">Baselines</th>
            <th className="px-3 py-2 font-semibold">Verdicts of the latest</th>
            <th className="px-3 py-2" />
          </tr>
        </thead>
        <tbody>
          {rooms.map((r) => (
            <tr key={r.room.id} className="border-t border-slate-100 align-top">
              <td className="px-3 py-2">
                <div className="font-semibold text-lamina-950">
                  {r.room.name}
                </div>
                <div className="text-xs text-slate-500">{r.room.site}</div>
              </td>
              <td className="px-3 py-2">
                <span
                  className={`rounded px-2 py-0.5 text-xs font-semibold ${STATUS[r.status].tone}`}
                >
                  {STATUS[r.status].label}
                </span>
                {r.conditionsChecked > 0 && (
                  <div className="mt-1 text-xs text-slate-500">
                    {r.conditionsOutside} of {r.conditionsChecked} checked
                    conditions outside
                  </div>
                )}
              </td>
              <td className="px-3 py-2">
                {r.latestStudy ? (
                  <>
                    {r.latestStudy.title}
                    <div className="text-xs text-slate-500">
                      signed {r.latestStudy.signedAt.slice(0, 10)}, revision{' '}
                      {r.latestStudy.revision}
                    </div>
                  </>
                ) : (
                  '—'
                )}
              </td>
              <td className="px-3 py-2 text-right tabular-nums">
                {r.signedStudies}
              </td>
              <td className="px-3 py-2 text-right tabular-nums">
                {r.activeBaselines}
              </td>
              <td className="px-3 py-2 text-xs text-slate-600">
                {r.verdicts?.sentence ?? '—'}
              </td>
              <td className="px-3 py-2 text-right">
                <Link
                  to={`/rooms/${r.room.id}/trend`}
                  className="text-sm font-semibold text-lamina-700 hover:underline"
                >
                  Trend
                </Link>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
