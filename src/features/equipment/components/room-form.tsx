import { useState, type FormEvent } from 'react';
import type {
  RoomDetailDto,
  RoomDto,
} from '../../../../shared/schemas/equipment.schema.ts';
import { TextField } from '../../../components/ui/field.tsx';
import { FormError } from '../../../components/ui/form-error.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { useCreateRoom, useUpdateRoom } from '../api/rooms.ts';
import { FormActions } from './form-actions.tsx';

interface RoomFormProps {
  /** The room to change; a new room when absent. */
  room?: RoomDto;
  onDone?: (room: RoomDetailDto) => void;
  onCancel?: () => void;
}

/** Adds a room or changes its name, site and notes. */
export function RoomForm({ room, onDone, onCancel }: RoomFormProps) {
  const create = useCreateRoom();
  const update = useUpdateRoom(room?.id ?? 0);
  const save = room ? update : create;
  const [name, setName] = useState(room?.name ?? '');
  const [site, setSite] = useState(room?.site ?? '');
  const [modalityNotes, setModalityNotes] = useState(room?.modalityNotes ?? '');
  const error = save.error instanceof ApiError ? save.error : null;

  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    save.mutate(
      { name, site, modalityNotes },
      {
        onSuccess: (saved) => {
          if (!room) {
            setName('');
            setModalityNotes('');
          }
          onDone?.(saved);
        },
      },
    );
  };

  return (
    <form
      onSubmit={handleSubmit}
      noValidate
      aria-label={room ? `Change ${room.name}` : 'Add a room'}
      className="grid gap-4 rounded-xl bg-white p-5 shadow-sm md:grid-cols-3"
    >
      <TextField
        label="Room name"
        value={name}
        onChange={(e) => setName(e.target.value)}
        error={error?.fieldMessage('name')}
      />
      <TextField
        label="Site"
        value={site}
        onChange={(e) => setSite(e.target.value)}
        error={error?.fieldMessage('site')}
        hint="e.g. Saltmarsh General Hospital, Main Building"
      />
      <TextField
        label="Modality notes"
        value={modalityNotes}
        onChange={(e) => setModalityNotes(e.target.value)}
        error={error?.fieldMessage('modalityNotes')}
      />
      <FormError error={error} className="md:col-span-3" />
      <FormActions
        submitLabel={room ? 'Save room' : 'Add room'}
        isDisabled={save.isPending}
        onCancel={onCancel}
        className="flex gap-3 md:col-span-3"
      />
    </form>
  );
}
