import { useState } from 'react';
import { Link } from 'react-router-dom';
import { Button } from '../../components/ui/button.tsx';
import {
  Empty,
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import { useSession } from '../../features/auth/api/session.ts';
import { useGrids } from '../../features/equipment/api/grids.ts';
import { useRooms } from '../../features/equipment/api/rooms.ts';
import { GridTable } from '../../features/equipment/components/grid-table.tsx';
import { RoomCard } from '../../features/equipment/components/room-card.tsx';
import { RoomForm } from '../../features/equipment/components/room-form.tsx';

export default function EquipmentOverviewPage() {
  const session = useSession();
  const rooms = useRooms();
  const grids = useGrids();
  const [isAdding, setIsAdding] = useState(false);
  const canEdit = session.data?.can.editEquipment ?? false;
  const looseGrids = grids.data?.filter((g) => g.roomId === null) ?? [];

  return (
    <div className="space-y-6">
      <PageTitle
        actions={
          <div className="flex gap-3">
            <Link
              to="/equipment/grids"
              className="rounded-lg px-4 py-2 text-sm font-semibold text-lamina-700 ring-1 ring-lamina-300 hover:bg-lamina-50"
            >
              Grid inventory
            </Link>
            {canEdit && !isAdding && (
              <Button onClick={() => setIsAdding(true)}>Add a room</Button>
            )}
          </div>
        }
      >
        Equipment
      </PageTitle>
      <p className="text-slate-700">
        Rooms with their X-ray units, detectors and the grids kept in them.
        {!canEdit &&
          ' The register is kept by administrators and physicists; you can read it.'}
      </p>
      {isAdding && (
        <RoomForm
          onDone={() => setIsAdding(false)}
          onCancel={() => setIsAdding(false)}
        />
      )}
      {rooms.isPending && <Loading what="the equipment register" />}
      {rooms.isError && (
        <ErrorNotice error={rooms.error} onRetry={() => void rooms.refetch()} />
      )}
      {rooms.data && rooms.data.length === 0 && (
        <Empty>
          No rooms are registered yet.
          {canEdit && ' Add the first room to start the register.'}
        </Empty>
      )}
      {rooms.data && rooms.data.length > 0 && (
        <div className="grid gap-4 md:grid-cols-2">
          {rooms.data.map((room) => (
            <RoomCard key={room.id} room={room} />
          ))}
        </div>
      )}
      {rooms.data && looseGrids.length > 0 && (
        <section aria-labelledby="loose-grids" className="space-y-3">
          <h2
            id="loose-grids"
            className="text-lg font-semibold text-lamina-950"
          >
            Grids not kept in one room
          </h2>
          <GridTable grids={looseGrids} rooms={rooms.data} />
        </section>
      )}
    </div>
  );
}
