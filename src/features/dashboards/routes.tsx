import { lazy, Suspense } from 'react';
import type { RouteObject } from 'react-router';
import { Loading } from '../../components/status';

/**
 * The agreement dashboards' pages, lazy-loaded (React.lazy): the charts library stays out of
 * the first chunk. Added to the federation's routes in src/app/router.tsx.
 */
const OverviewPage = lazy(() => import('./components/overview-page').then((m) => ({ default: m.OverviewPage })));
const ClassifiersPage = lazy(() => import('./components/classifiers-page').then((m) => ({ default: m.ClassifiersPage })));
const ClassifierPage = lazy(() => import('./components/classifier-page').then((m) => ({ default: m.ClassifierPage })));
const PairsPage = lazy(() => import('./components/pairs-page').then((m) => ({ default: m.PairsPage })));
const BoundariesPage = lazy(() => import('./components/boundaries-page').then((m) => ({ default: m.BoundariesPage })));
const DriftPage = lazy(() => import('./components/drift-page').then((m) => ({ default: m.DriftPage })));
const FlagsPage = lazy(() => import('./components/flags-page').then((m) => ({ default: m.FlagsPage })));
const MyAgreementPage = lazy(() => import('./components/my-agreement-page').then((m) => ({ default: m.MyAgreementPage })));

const page = (element: React.ReactNode) => <Suspense fallback={<Loading />}>{element}</Suspense>;

export const overviewRoute: RouteObject = { index: true, element: page(<OverviewPage />) };

export const dashboardRoutes: RouteObject[] = [
  { path: 'classifiers', element: page(<ClassifiersPage />) },
  { path: 'classifiers/:code', element: page(<ClassifierPage />) },
  { path: 'pairs', element: page(<PairsPage />) },
  { path: 'boundaries', element: page(<BoundariesPage />) },
  { path: 'drift', element: page(<DriftPage />) },
  { path: 'flags', element: page(<FlagsPage />) },
  { path: 'me', element: page(<MyAgreementPage />) },
];
