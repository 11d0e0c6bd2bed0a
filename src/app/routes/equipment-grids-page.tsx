import { useState } from 'react';
import { Breadcrumbs } from '../../components/ui/breadcrumbs.tsx';
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
import { GridForm } from '../../features/equipment/components/grid-form.tsx';
import { GridTable } from '../../features/equipment/components/grid-table.tsx';

export default function EquipmentGridsPage() {
  const session = useSession();
  const grids = useGrids();
  const rooms = useRooms();
  const [isAdding, setIsAdding] = useState(false);
  const [added, setAdded] = useState<string | null>(null);
  const canEdit = session.data?.can.editEquipment ?? false;

  return (
    <div className="space-y-6">
      <Breadcrumbs
        trail={[{ to: '/equipment', label: 'Equipment' }]}
        current="Grid inventory"
      />
      <PageTitle
        actions={
          canEdit &&
          !isAdding && (
            <Button
              onClick={() => {
                setAdded(null);
                setIsAdding(true);
              }}
            >
              Add a grid
            </Button>
          )
        }
      >
        Grid inventory
      </PageTitle>
      {added && (
        <p role="status" className="text-sm text-lamina-700">
          {added} was added.
        </p>
      )}
      {isAdding && rooms.data && (
        <GridForm
          rooms={rooms.data}
          onDone={(grid) => {
            setAdded(grid.label);
            setIsAdding(false);
          }}
          onCancel={() => setIsAdding(false)}
        />
      )}
      {(grids.isPending || rooms.isPending) && (
        <Loading what="the grid inventory" />
      )}
      {grids.isError && (
        <ErrorNotice error={grids.error} onRetry={() => void grids.refetch()} />
      )}
      {rooms.isError && (
        <ErrorNotice error={rooms.error} onRetry={() => void rooms.refetch()} />
      )}
      {grids.data && rooms.data && grids.data.length === 0 && (
        <Empty>
          No grid is in the inventory yet.
          {canEdit && ' Add one with the button above.'}
        </Empty>
      )}
      {grids.data && rooms.data && grids.data.length > 0 && (
        <GridTable grids={grids.data} rooms={rooms.data} />
      )}
      <p className="text-xs text-slate-500">
        Values marked “derived” were worked out from the entered ones (r = h/D,
        N = 1/(D + t)).
      </p>
    </div>
  );
}
