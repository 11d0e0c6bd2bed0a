import { Navigate, NavLink, Outlet, useLocation } from 'react-router-dom';
import { useSession, useSignOut } from '../features/auth/api/session.ts';
import { Button } from '../components/ui/button.tsx';
import { ErrorNotice, Loading } from '../components/ui/page-state.tsx';
import { ErrorBoundary } from './provider.tsx';
import { NAV_ITEMS } from './navigation.ts';

/** The signed-in frame: header with navigation, then the page. */
export function AppLayout() {
  const session = useSession();
  const signOut = useSignOut();
  const location = useLocation();

  if (session.isPending) return <Loading what="your session" />;
  if (session.isError)
    return (
      <div className="p-6">
        <ErrorNotice
          error={session.error}
          onRetry={() => void session.refetch()}
        />
      </div>
    );
  if (!session.data)
    return (
      <Navigate to="/sign-in" replace state={{ from: location.pathname }} />
    );

  const current = session.data;
  return (
    <div className="min-h-screen">
      <a
        href="#main"
        className="sr-only focus:not-sr-only focus:absolute focus:p-2"
      >
        Skip to content
      </a>
      <header className="bg-lamina-950 text-white">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-6 px-gutter py-3">
          <span className="text-lg font-semibold tracking-wide">Lamella</span>
          <nav aria-label="Main" className="flex flex-1 flex-wrap gap-1">
            {NAV_ITEMS.filter((item) => item.isShown(current)).map((item) => (
              <NavLink
                key={item.to}
                to={item.to}
                end={item.to === '/'}
                className={({ isActive }) =>
                  `rounded-md px-3 py-1.5 text-sm ${isActive ? 'bg-lamina-700 text-white' : 'text-lamina-100 hover:bg-lamina-800'}`
                }
              >
                {item.label}
              </NavLink>
            ))}
          </nav>
          <span className="text-sm text-lamina-200" data-testid="signed-in-as">
            {current.user.displayName} · {current.user.role}
          </span>
          <Button
            variant="secondary"
            onClick={() => signOut.mutate()}
            disabled={signOut.isPending}
          >
            Sign out
          </Button>
        </div>
      </header>
      <main id="main" className="mx-auto max-w-7xl px-gutter py-8">
        <ErrorBoundary label="page">
          <Outlet />
        </ErrorBoundary>
      </main>
    </div>
  );
}
