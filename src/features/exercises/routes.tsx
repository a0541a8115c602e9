import { lazy, Suspense } from 'react';
import type { RouteObject } from 'react-router';
import { Loading } from '../../components/status';

/** The calibration exercises' pages (lazy: the results page draws charts). Added in src/app/router.tsx. */
const ExercisesPage = lazy(() => import('./components/exercises-page').then((m) => ({ default: m.ExercisesPage })));
const NewExercisePage = lazy(() => import('./components/new-exercise-page').then((m) => ({ default: m.NewExercisePage })));
const ExercisePage = lazy(() => import('./components/exercise-page').then((m) => ({ default: m.ExercisePage })));

const page = (element: React.ReactNode) => <Suspense fallback={<Loading />}>{element}</Suspense>;

export const exerciseRoutes: RouteObject[] = [
  { path: 'exercises', element: page(<ExercisesPage />) },
  { path: 'exercises/new', element: page(<NewExercisePage />) },
  { path: 'exercises/:id', element: page(<ExercisePage />) },
];
