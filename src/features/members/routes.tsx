import type { RouteObject } from 'react-router';

/** A lead's pages of people and systems, below /f/:federation (lazy-loaded). */
export const memberRoutes: RouteObject[] = [
  { path: 'members', lazy: () => import('./components/members-page').then((m) => ({ Component: m.MembersPage })) },
  { path: 'outbox', lazy: () => import('./components/outbox-page').then((m) => ({ Component: m.OutboxPage })) },
];

/** The site owner's page (needs a session, not a federation). */
export const ownerRoute: RouteObject = {
  path: '/owner',
  lazy: () => import('../owner/components/owner-page').then((m) => ({ Component: m.OwnerPage })),
};
