import { useState, type FormEvent } from 'react';
import {
  ROLE_DESCRIPTIONS,
  ROLES,
  type Role,
} from '../../../../shared/permissions.ts';
import { Button } from '../../../components/ui/button.tsx';
import { SelectField, TextField } from '../../../components/ui/field.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { useInviteUser } from '../api/users.ts';

export function InviteUserForm() {
  const invite = useInviteUser();
  const [email, setEmail] = useState('');
  const [displayName, setDisplayName] = useState('');
  const [role, setRole] = useState<Role>('resident');
  const error = invite.error instanceof ApiError ? invite.error : null;

  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    invite.mutate(
      { email, displayName, role },
      {
        onSuccess: () => {
          setEmail('');
          setDisplayName('');
        },
      },
    );
  };

  return (
    <form
      onSubmit={handleSubmit}
      className="grid gap-4 rounded-xl bg-white p-6 shadow-sm md:grid-cols-4"
      noValidate
    >
      <h2 className="text-lg font-semibold md:col-span-4">Invite a user</h2>
      <TextField
        label="Name"
        value={displayName}
        onChange={(e) => setDisplayName(e.target.value)}
        error={error?.fieldMessage('displayName')}
      />
      <TextField
        label="E-mail address"
        type="email"
        value={email}
        onChange={(e) => setEmail(e.target.value)}
        error={error?.fieldMessage('email')}
      />
      <SelectField
        label="Role"
        value={role}
        onChange={(e) => setRole(e.target.value as Role)}
      >
        {ROLES.map((r) => (
          <option key={r} value={r}>
            {r}
          </option>
        ))}
      </SelectField>
      <div className="flex items-end">
        <Button type="submit" disabled={invite.isPending}>
          Send invitation
        </Button>
      </div>
      <p className="text-xs text-slate-500 md:col-span-4">
        {ROLE_DESCRIPTIONS[role]}
      </p>
      {error && error.details.length === 0 && (
        <p role="alert" className="text-sm text-red-700 md:col-span-4">
          {error.message}
        </p>
      )}
      {invite.isSuccess && (
        <p role="status" className="text-sm text-lamina-700 md:col-span-4">
          Invitation sent to {invite.data.email}.
        </p>
      )}
    </form>
  );
}
