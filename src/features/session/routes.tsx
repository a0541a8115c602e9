import type { RouteObject } from 'react-router';

/** Pages of e-mailed links and of asking for one; they need no session. */
export const accessLinkRoutes: RouteObject[] = [
  { path: '/forgot-password', lazy: () => import('./components/forgot-password-page').then((m) => ({ Component: m.ForgotPasswordPage })) },
  {
    path: '/reset-password/:token',
    lazy: () => import('./components/reset-password-page').then((m) => ({ Component: m.ResetPasswordPage })),
  },
  {
    path: '/invitations/:token',
    lazy: () => import('./components/accept-invitation-page').then((m) => ({ Component: m.AcceptInvitationPage })),
  },
];
