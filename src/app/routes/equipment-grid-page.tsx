import { useState } from 'react';
import { useNavigate, useParams } from 'react-router-dom';
import { Breadcrumbs } from '../../components/ui/breadcrumbs.tsx';
import {
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import { useDeleteGrid, useGrid } from '../../features/equipment/api/grids.ts';
import { useRooms } from '../../features/equipment/api/rooms.ts';
import { GridDetails } from '../../features/equipment/components/grid-details.tsx';
import { GridForm } from '../../features/equipment/components/grid-form.tsx';
import { RecordActions } from '../../features/equipment/components/record-actions.tsx';

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
      <Breadcrumbs
        trail={[
          { to: '/equipment', label: 'Equipment' },
          { to: '/equipment/grids', label: 'Grid inventory' },
        ]}
        current={data.label}
      />
      <PageTitle
        actions={
          <RecordActions
            noun="grid"
            name={data.label}
            canEdit={data.permissions.edit}
            canDelete={data.permissions.delete}
            isEditing={isEditing}
            onEdit={() => setIsEditing(true)}
            isDeleting={remove.isPending}
            onDelete={() =>
              remove.mutate(data.id, {
                onSuccess: () => void navigate('/equipment/grids'),
              })
            }
          />
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
