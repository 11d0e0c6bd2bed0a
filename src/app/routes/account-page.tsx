import { useState, type FormEvent } from 'react';
import { Button } from '../../components/ui/button.tsx';
import { TextField } from '../../components/ui/field.tsx';
import { PageTitle } from '../../components/ui/page-state.tsx';
import { useChangePassword } from '../../features/auth/api/account.ts';
import { useSession } from '../../features/auth/api/session.ts';
import { ApiError } from '../../lib/api-client.ts';

export default function AccountPage() {
  const { data } = useSession();
  const change = useChangePassword();
  const [currentPassword, setCurrent] = useState('');
  const [newPassword, setNew] = useState('');
  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    change.mutate(
      { currentPassword, newPassword },
      {
        onSuccess: () => {
          setCurrent('');
          setNew('');
        },
      },
    );
  };
  const error = change.error instanceof ApiError ? change.error : null;
  if (!data) return null;
  return (
    <div className="max-w-lg space-y-6">
      <PageTitle>Your account</PageTitle>
      <dl className="grid grid-cols-3 gap-2 text-sm">
        <dt className="text-slate-500">Name</dt>
        <dd className="col-span-2">{data.user.displayName}</dd>
        <dt className="text-slate-500">E-mail</dt>
        <dd className="col-span-2">{data.user.email}</dd>
        <dt className="text-slate-500">Role</dt>
        <dd className="col-span-2">{data.user.role}</dd>
      </dl>
      <form
        onSubmit={handleSubmit}
        className="space-y-4 rounded-xl bg-white p-6 shadow-sm"
        noValidate
      >
        <h2 className="text-lg font-semibold">Change your password</h2>
        <TextField
          label="Current password"
          type="password"
          autoComplete="current-password"
          value={currentPassword}
          onChange={(e) => setCurrent(e.target.value)}
          error={error?.fieldMessage('currentPassword')}
        />
        <TextField
          label="New password"
          type="password"
          autoComplete="new-password"
          value={newPassword}
          onChange={(e) => setNew(e.target.value)}
          hint="At least 10 characters."
          error={error?.fieldMessage('newPassword')}
        />
        {change.isSuccess && (
          <p role="status" className="text-sm text-lamina-700">
            Password changed.
          </p>
        )}
        <Button type="submit" disabled={change.isPending}>
          Change password
        </Button>
      </form>
    </div>
  );
}
