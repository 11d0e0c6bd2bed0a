import { Link } from 'react-router-dom';
import {
  DETECTOR_TYPE_LABELS,
  type RoomDetailDto,
} from '../../../../shared/schemas/equipment.schema.ts';
import { formatNumber, formatRatio } from './format.ts';

/** One room of the overview: its X-ray units, detectors and grids. */
export function RoomCard({ room }: { room: RoomDetailDto }) {
  return (
    <article
      aria-labelledby={`room-${room.id}-name`}
      className="flex flex-col rounded-xl bg-white p-5 shadow-sm"
      data-testid={`room-card-${room.name}`}
    >
      <header className="mb-3">
        <h2
          id={`room-${room.id}-name`}
          className="text-lg font-semibold text-lamina-950"
        >
          <Link to={`/equipment/rooms/${room.id}`} className="hover:underline">
            {room.name}
          </Link>
        </h2>
        <p className="text-sm text-slate-500">{room.site}</p>
        {room.modalityNotes && (
          <p className="mt-1 text-sm text-slate-700">{room.modalityNotes}</p>
        )}
      </header>
      <dl className="space-y-3 text-sm">
        <div>
          <dt className="text-xs font-semibold uppercase tracking-wide text-slate-500">
            X-ray units
          </dt>
          <dd>
            {room.units.length === 0
              ? 'None recorded'
              : room.units
                  .map((u) => `${u.name}${u.model ? ` (${u.model})` : ''}`)
                  .join(', ')}
          </dd>
        </div>
        <div>
          <dt className="text-xs font-semibold uppercase tracking-wide text-slate-500">
            Detectors
          </dt>
          <dd>
            {room.detectors.length === 0 ? (
              'None recorded'
            ) : (
              <ul>
                {room.detectors.map((d) => (
                  <li key={d.id}>
                    <Link
                      to={`/equipment/detectors/${d.id}`}
                      className="text-lamina-700 underline"
                    >
                      {d.name}
                    </Link>{' '}
                    · {DETECTOR_TYPE_LABELS[d.detectorType]} ·{' '}
                    {formatNumber(d.pixelPitchUm)} µm ·{' '}
                    {d.calibrationCount === 0
                      ? 'not calibrated'
                      : `${d.calibrationCount} calibration(s)`}
                  </li>
                ))}
              </ul>
            )}
          </dd>
        </div>
        <div>
          <dt className="text-xs font-semibold uppercase tracking-wide text-slate-500">
            Grids
          </dt>
          <dd>
            {room.grids.length === 0 ? (
              'None kept here'
            ) : (
              <ul>
                {room.grids.map((g) => (
                  <li key={g.id}>
                    <Link
                      to={`/equipment/grids/${g.id}`}
                      className="text-lamina-700 underline"
                    >
                      {g.label}
                    </Link>{' '}
                    · {formatRatio(g.ratio)}
                    {g.stripFrequencyPerCm !== null &&
                      ` · ${formatNumber(g.stripFrequencyPerCm, 3)} lines/cm`}
                    {g.focusDistanceCm !== null &&
                      ` · f0 ${formatNumber(g.focusDistanceCm)} cm`}
                  </li>
                ))}
              </ul>
            )}
          </dd>
        </div>
      </dl>
    </article>
  );
}
