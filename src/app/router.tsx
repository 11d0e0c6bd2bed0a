import { lazy, Suspense, type ReactNode } from 'react';
import { createBrowserRouter, RouterProvider } from 'react-router-dom';
import { Loading } from '../components/ui/page-state.tsx';
import { AppLayout } from './app-layout.tsx';

const page = (load: () => Promise<{ default: () => ReactNode }>) => {
  const Page = lazy(load);
  return (
    <Suspense fallback={<Loading what="the page" />}>
      <Page />
    </Suspense>
  );
};

const router = createBrowserRouter([
  {
    path: '/sign-in',
    element: page(() => import('./routes/sign-in-page.tsx')),
  },
  {
    path: '/forgot-password',
    element: page(() => import('./routes/forgot-password-page.tsx')),
  },
  {
    path: '/welcome/:token',
    element: page(() => import('./routes/set-password-page.tsx')),
  },
  {
    path: '/reset-password/:token',
    element: page(() => import('./routes/set-password-page.tsx')),
  },
  {
    element: <AppLayout />,
    children: [
      { index: true, element: page(() => import('./routes/home-page.tsx')) },
      {
        path: 'geometry',
        element: page(() => import('./routes/geometry-page.tsx')),
      },
      {
        path: 'account',
        element: page(() => import('./routes/account-page.tsx')),
      },
      {
        path: 'images/upload',
        element: page(() => import('./routes/upload-images-page.tsx')),
      },
      {
        path: 'studies',
        element: page(() => import('./routes/studies-page.tsx')),
      },
      {
        path: 'studies/new',
        element: page(() => import('./routes/study-new-page.tsx')),
      },
      {
        path: 'studies/:id',
        element: page(() => import('./routes/study-page.tsx')),
      },
      {
        path: 'studies/:id/edit',
        element: page(() => import('./routes/study-edit-page.tsx')),
      },
      {
        path: 'studies/:id/regions',
        element: page(() => import('./routes/region-editor-page.tsx')),
      },
      {
        path: 'studies/:id/regions/:imageId',
        element: page(() => import('./routes/region-editor-page.tsx')),
      },
      {
        path: 'studies/:id/results',
        element: page(() => import('./routes/study-results-page.tsx')),
      },
      {
        path: 'studies/:id/checklist',
        element: page(() => import('./routes/study-checklist-page.tsx')),
      },
      {
        path: 'studies/:id/revisions/:revision',
        element: page(() => import('./routes/study-revision-page.tsx')),
      },
      {
        path: 'admin/users',
        element: page(() => import('./routes/admin-users-page.tsx')),
      },
      {
        path: 'admin/mail',
        element: page(() => import('./routes/sent-mail-page.tsx')),
      },
      {
        path: 'equipment',
        element: page(() => import('./routes/equipment-overview-page.tsx')),
      },
      {
        path: 'equipment/rooms/:id',
        element: page(() => import('./routes/equipment-room-page.tsx')),
      },
      {
        path: 'equipment/grids',
        element: page(() => import('./routes/equipment-grids-page.tsx')),
      },
      {
        path: 'equipment/grids/:id',
        element: page(() => import('./routes/equipment-grid-page.tsx')),
      },
      {
        path: 'equipment/detectors/:id',
        element: page(() => import('./routes/equipment-detector-page.tsx')),
      },
      {
        path: 'compare',
        element: page(() => import('./routes/compare-page.tsx')),
      },
      {
        path: 'rooms',
        element: page(() => import('./routes/room-summary-page.tsx')),
      },
      {
        path: 'rooms/:id/trend',
        element: page(() => import('./routes/room-trend-page.tsx')),
      },
      { path: '*', element: page(() => import('./routes/not-found-page.tsx')) },
    ],
  },
]);

export function AppRouter() {
  return <RouterProvider router={router} />;
}
