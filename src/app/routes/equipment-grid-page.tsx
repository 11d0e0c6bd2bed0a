import { useState } from 'react';
import { Link, useNavigate, useParams } from 'react-router-dom';
import { Button } from '../../components/ui/button.tsx';
import {
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import { useDeleteGrid, useGrid } from '../../features/equipment/api/grids.ts';
import { useRooms } from '../../features/equipment/api/rooms.ts';
import { GridDetails } from '../../features/equipment/components/grid-details.tsx';
import { GridForm } from '../../features/equipment/components/grid-form.tsx';

export default function EquipmentGridPage() {
  const id = Number(useParams().id);
  const grid = useGrid(id);
  const rooms = useRooms();
  const remove = useDeleteGrid();
  const navigate = useNavigate();
  const [isEditing, setIsEditing] = useState(false);

  if (grid.isPending || rooms.isPending) return <Loading what="the grid" />;
  if (grid.isError)
    return (
      <ErrorNotice error={grid.error} onRetry={() => void grid.refetch()} />
    );
  if (rooms.isError)
    return (
      <ErrorNotice error={rooms.error} onRetry={() => void rooms.refetch()} />
    );
  const data = grid.data;
  const roomName =
    rooms.data.find((r) => r.id === data.roomId)?.name ??
    'Not kept in one room';

  return (
    <div className="space-y-6">
      <p className="text-sm">
        <Link to="/equipment" className="text-lamina-700 underline">
          Equipment
        </Link>{' '}
        /{' '}
        <Link to="/equipment/grids" className="text-lamina-700 underline">
          Grid inventory
        </Link>{' '}
        / {data.label}
      </p>
      <PageTitle
        actions={
          <div className="flex gap-3">
            {data.permissions.edit && !isEditing && (
              <Button variant="secondary" onClick={() => setIsEditing(true)}>
                Change grid
              </Button>
            )}
            {data.permissions.delete && (
              <Button
                variant="danger"
                disabled={remove.isPending}
                onClick={() => {
                  if (window.confirm(`Delete ${data.label}?`)) {
                    remove.mutate(data.id, {
                      onSuccess: () => void navigate('/equipment/grids'),
                    });
                  }
                }}
              >
                Delete grid
              </Button>
            )}
          </div>
        }
      >
        {data.label}
      </PageTitle>
      {remove.isError && <ErrorNotice error={remove.error} />}
      {isEditing ? (
        <GridForm
          rooms={rooms.data}
          grid={data}
          onDone={() => setIsEditing(false)}
          onCancel={() => setIsEditing(false)}
        />
      ) : (
        <GridDetails grid={data} roomName={roomName} />
      )}
    </div>
  );
}
