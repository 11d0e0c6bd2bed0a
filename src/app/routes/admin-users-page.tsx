import {
  Empty,
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import { useUsers } from '../../features/admin/api/users.ts';
import { InviteUserForm } from '../../features/admin/components/invite-user-form.tsx';
import { UsersTable } from '../../features/admin/components/users-table.tsx';

export default function AdminUsersPage() {
  const users = useUsers();
  return (
    <div className="space-y-6">
      <PageTitle>Users</PageTitle>
      <InviteUserForm />
      {users.isPending && <Loading what="users" />}
      {users.isError && (
        <ErrorNotice error={users.error} onRetry={() => void users.refetch()} />
      )}
      {users.data && users.data.length === 0 && <Empty>No users yet.</Empty>}
      {users.data && users.data.length > 0 && <UsersTable users={users.data} />}
    </div>
  );
}
