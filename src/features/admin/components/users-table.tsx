import { ROLES, type Role } from '../../../../shared/permissions.ts';
import type { UserDto } from '../../../../shared/schemas/auth.schema.ts';
import { Button } from '../../../components/ui/button.tsx';
import { ErrorNotice } from '../../../components/ui/page-state.tsx';
import { useUpdateUser } from '../api/users.ts';

export function UsersTable({ users }: { users: UserDto[] }) {
  const update = useUpdateUser();
  return (
    <div className="space-y-3">
      {update.isError && <ErrorNotice error={update.error} />}
      <table className="w-full overflow-hidden rounded-xl bg-white text-sm shadow-sm">
        <thead className="bg-lamina-50 text-left text-lamina-900">
          <tr>
            <th className="px-4 py-2">Name</th>
            <th className="px-4 py-2">E-mail</th>
            <th className="px-4 py-2">Role</th>
            <th className="px-4 py-2">Status</th>
            <th className="px-4 py-2">
              <span className="sr-only">Actions</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {users.map((user) => (
            <tr
              key={user.id}
              className="border-t border-slate-100"
              data-testid={`user-row-${user.email}`}
            >
              <td className="px-4 py-2">{user.displayName}</td>
              <td className="px-4 py-2">{user.email}</td>
              <td className="px-4 py-2">
                {user.permissions.edit ? (
                  <select
                    aria-label={`Role of ${user.displayName}`}
                    value={user.role}
                    className="rounded border border-slate-300 px-2 py-1"
                    onChange={(e) =>
                      update.mutate({
                        id: user.id,
                        change: { role: e.target.value as Role },
                      })
                    }
                  >
                    {ROLES.map((r) => (
                      <option key={r} value={r}>
                        {r}
                      </option>
                    ))}
                  </select>
                ) : (
                  user.role
                )}
              </td>
              <td className="px-4 py-2">{user.status}</td>
              <td className="px-4 py-2 text-right">
                {user.permissions.edit && (
                  <Button
                    variant={
                      user.status === 'disabled' ? 'secondary' : 'danger'
                    }
                    onClick={() =>
                      update.mutate({
                        id: user.id,
                        change: { disabled: user.status !== 'disabled' },
                      })
                    }
                  >
                    {user.status === 'disabled' ? 'Enable' : 'Disable'}
                  </Button>
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
