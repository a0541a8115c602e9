import { createBrowserRouter, type RouteObject } from 'react-router';
import { dashboardRoutes, overviewRoute } from '../features/dashboards/routes';
import { exerciseRoutes } from '../features/exercises/routes';
import { memberRoutes, ownerRoute } from '../features/members/routes';
import { accessLinkRoutes } from '../features/session/routes';
import { SignInPage } from '../features/session/components/sign-in-page';
import { ExpiredLinkPage, ForbiddenPage, NotFoundPage, RouteErrorPage } from './error-pages';
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
