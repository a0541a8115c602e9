import { createBrowserRouter, type RouteObject } from 'react-router';
import { dashboardRoutes, overviewRoute } from '../features/dashboards/routes';
import { exerciseRoutes } from '../features/exercises/routes';
import { memberRoutes, ownerRoute } from '../features/members/routes';
import { accessLinkRoutes } from '../features/session/routes';
import { SignInPage } from '../features/session/components/sign-in-page';
import { ExpiredLinkPage, ForbiddenPage, NotFoundPage, RouteErrorPage } from '../components/error-pages';
import { Loading } from '../components/status';
import { FederationLayout, HomeRedirect, RequireSession } from './layout';

/**
 * Pages inside a federation, below /f/:federation. Chart-heavy pages are lazy-loaded so the
 * first chunk stays small.
 */
export const federationRoutes: RouteObject[] = [
  overviewRoute,
  ...dashboardRoutes,
  ...memberRoutes,
  ...exerciseRoutes,
  { path: 'exports', lazy: () => import('../features/exports/components/exports-page').then((m) => ({ Component: m.ExportsPage })) },
  { path: 'imports', lazy: () => import('../features/imports/components/imports-page').then((m) => ({ Component: m.ImportsPage })) },
  { path: 'help', lazy: () => import('./help-page').then((m) => ({ Component: m.HelpPage })) },
];

/** Pages that need no session (sign-in, links from e-mails). */
export const publicRoutes: RouteObject[] = [
  { path: '/sign-in', element: <SignInPage /> },
  { path: '/expired', element: <ExpiredLinkPage /> },
  ...accessLinkRoutes,
];

export const routes: RouteObject[] = [
  {
    errorElement: <RouteErrorPage />,
    // Shown while the first page's lazy module loads (and keeps React Router from warning).
    hydrateFallbackElement: <Loading />,
    children: [
      ...publicRoutes,
      {
        element: <RequireSession />,
        children: [
          { path: '/', element: <HomeRedirect /> },
          { path: '/forbidden', element: <ForbiddenPage /> },
          ownerRoute,
          { path: '/f/:federation', element: <FederationLayout />, children: federationRoutes },
        ],
      },
      { path: '*', element: <NotFoundPage /> },
    ],
  },
];

export function createAppRouter() {
  return createBrowserRouter(routes);
}
