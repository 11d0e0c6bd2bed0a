import { useState, type ReactNode } from 'react';
import { Link, useNavigate, useParams } from 'react-router-dom';
import { DETECTOR_TYPE_LABELS } from '../../../shared/schemas/equipment.schema.ts';
import { Breadcrumbs } from '../../components/ui/breadcrumbs.tsx';
import { Button } from '../../components/ui/button.tsx';
import {
  Empty,
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import {
  useDeleteRoom,
  useDeleteXrayUnit,
  useRoom,
} from '../../features/equipment/api/rooms.ts';
import { DetectorForm } from '../../features/equipment/components/detector-form.tsx';
import {
  formatNumber,
  formatRatio,
} from '../../features/equipment/components/format.ts';
import { RecordActions } from '../../features/equipment/components/record-actions.tsx';
import { RoomForm } from '../../features/equipment/components/room-form.tsx';
import { UnitForm } from '../../features/equipment/components/unit-form.tsx';

function RoomSection({
  id,
  title,
  children,
}: {
  id: string;
  title: string;
  children: ReactNode;
}) {
  return (
    <section
      aria-labelledby={`${id}-heading`}
      className="space-y-3 rounded-xl bg-white p-5 shadow-sm"
    >
      <h2
        id={`${id}-heading`}
        className="text-lg font-semibold text-lamina-950"
      >
        {title}
      </h2>
      {children}
    </section>
  );
}

export default function EquipmentRoomPage() {
  const id = Number(useParams().id);
  const room = useRoom(id);
  const removeRoom = useDeleteRoom();
  const removeUnit = useDeleteXrayUnit();
  const navigate = useNavigate();
  const [isEditing, setIsEditing] = useState(false);

  if (room.isPending) return <Loading what="the room" />;
  if (room.isError)
    return (
      <ErrorNotice error={room.error} onRetry={() => void room.refetch()} />
    );
  const data = room.data;
  const canEdit = data.permissions.edit;

  return (
    <div className="space-y-6">
      <Breadcrumbs
        trail={[{ to: '/equipment', label: 'Equipment' }]}
        current={data.name}
      />
      <PageTitle
        actions={
          <RecordActions
            noun="room"
            name={data.name}
            canEdit={canEdit}
            canDelete={data.permissions.delete}
            isEditing={isEditing}
            onEdit={() => setIsEditing(true)}
            isDeleting={removeRoom.isPending}
            onDelete={() =>
              removeRoom.mutate(data.id, {
                onSuccess: () => void navigate('/equipment'),
              })
            }
          />
        }
      >
        {data.name}
      </PageTitle>
      <p className="text-slate-700">
        {data.site}
        {data.modalityNotes && ` · ${data.modalityNotes}`}
      </p>
      {canEdit && !data.permissions.delete && (
        <p className="text-xs text-slate-500">
          A room can be deleted once no unit, detector or grid is kept in it.
        </p>
      )}
      {removeRoom.isError && <ErrorNotice error={removeRoom.error} />}
      {isEditing && (
        <RoomForm
          room={data}
          onDone={() => setIsEditing(false)}
          onCancel={() => setIsEditing(false)}
        />
      )}

      <RoomSection id="units" title="X-ray units">
        {removeUnit.isError && <ErrorNotice error={removeUnit.error} />}
        {data.units.length === 0 ? (
          <Empty>No X-ray unit is recorded for this room.</Empty>
        ) : (
          <ul className="divide-y divide-slate-100 text-sm">
            {data.units.map((unit) => (
              <li
                key={unit.id}
                className="flex items-center justify-between py-2"
              >
                <span>
                  <strong>{unit.name}</strong> ·{' '}
                  {unit.model ?? 'model not recorded'} · serial{' '}
                  {unit.serial ?? '–'}
                </span>
                {unit.permissions.delete && (
                  <Button
                    variant="quiet"
                    aria-label={`Delete unit ${unit.name}`}
                    onClick={() => {
                      if (window.confirm(`Delete ${unit.name}?`)) {
                        removeUnit.mutate(unit.id);
                      }
                    }}
                  >
                    Delete
                  </Button>
                )}
              </li>
            ))}
          </ul>
        )}
        {canEdit && <UnitForm roomId={data.id} />}
      </RoomSection>

      <RoomSection id="detectors" title="Detectors">
        {data.detectors.length === 0 ? (
          <Empty>No detector is recorded for this room.</Empty>
        ) : (
          <ul className="divide-y divide-slate-100 text-sm">
            {data.detectors.map((detector) => (
              <li key={detector.id} className="py-2">
                <Link
                  to={`/equipment/detectors/${detector.id}`}
                  className="font-semibold text-lamina-700 underline"
                >
                  {detector.name}
                </Link>{' '}
                · {DETECTOR_TYPE_LABELS[detector.detectorType]} · pixel pitch{' '}
                {formatNumber(detector.pixelPitchUm)} µm ·{' '}
                {detector.calibrationCount} calibration record(s)
              </li>
            ))}
          </ul>
        )}
        {canEdit && <DetectorForm roomId={data.id} />}
      </RoomSection>

      <RoomSection id="grids" title="Grids kept here">
        {data.grids.length === 0 ? (
          <Empty>No grid is kept in this room.</Empty>
        ) : (
          <ul className="divide-y divide-slate-100 text-sm">
            {data.grids.map((grid) => (
              <li key={grid.id} className="py-2">
                <Link
                  to={`/equipment/grids/${grid.id}`}
                  className="font-semibold text-lamina-700 underline"
                >
                  {grid.label}
                </Link>{' '}
                · {formatRatio(grid.ratio)}
                {grid.stripFrequencyPerCm !== null &&
                  ` · ${formatNumber(grid.stripFrequencyPerCm, 3)} lines/cm`}
              </li>
            ))}
          </ul>
        )}
        <Link
          to="/equipment/grids"
          className="text-sm text-lamina-700 underline"
        >
          Open the grid inventory
        </Link>
      </RoomSection>
    </div>
  );
}
