import { useState, type FormEvent } from 'react';
import { Button } from '../../../components/ui/button.tsx';
import { TextField } from '../../../components/ui/field.tsx';
import { FormError } from '../../../components/ui/form-error.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { useCreateXrayUnit } from '../api/rooms.ts';

/** Adds an X-ray unit to a room. */
export function UnitForm({ roomId }: { roomId: number }) {
  const create = useCreateXrayUnit();
  const [name, setName] = useState('');
  const [model, setModel] = useState('');
  const [serial, setSerial] = useState('');
  const error = create.error instanceof ApiError ? create.error : null;

  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    create.mutate(
      { roomId, name, model, serial },
      {
        onSuccess: () => {
          setName('');
          setModel('');
          setSerial('');
        },
      },
    );
  };

  return (
    <form
      onSubmit={handleSubmit}
      noValidate
      aria-label="Add an X-ray unit"
      className="grid gap-3 md:grid-cols-4"
    >
      <TextField
        label="Unit name"
        value={name}
        onChange={(e) => setName(e.target.value)}
        error={error?.fieldMessage('name')}
      />
      <TextField
        label="Unit model"
        value={model}
        onChange={(e) => setModel(e.target.value)}
        error={error?.fieldMessage('model')}
      />
      <TextField
        label="Unit serial number"
        value={serial}
        onChange={(e) => setSerial(e.target.value)}
        error={error?.fieldMessage('serial')}
      />
      <div className="flex items-end">
        <Button type="submit" variant="secondary" disabled={create.isPending}>
          Add unit
        </Button>
      </div>
      <FormError error={error} className="md:col-span-4" />
    </form>
  );
}
