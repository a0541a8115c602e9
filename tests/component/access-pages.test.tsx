import { screen, waitFor } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import { pageAllowed } from '../../src/app/page-access';
import { AcceptInvitationPage } from '../../src/features/session/components/accept-invitation-page';
import { ResetPasswordPage } from '../../src/features/session/components/reset-password-page';
import { mockApi, renderRoutes } from './render';

const noSession = () => ({ status: 401, body: { error: { code: 'unauthenticated', message: 'Sign in' } } });
const gone = () => ({
  status: 410,
  body: { error: { code: 'gone', message: 'This link has expired or was already used. Ask for a new one.' } },
});
const TOKEN = 'a'.repeat(43);

describe('accept-invitation page', () => {
  it('checks name and matching passwords with the shared schema before sending', async () => {
    const calls = mockApi({
      'GET /api/session': noSession,
      [`GET /api/invitations/${TOKEN}`]: () => ({
        status: 200,
        body: {
          email: 'new@example.test',
          federation: { slug: 'kestrel-coast', name: 'Kestrel Coast' },
          role: 'classifier',
          classifierCode: 'C03',
          existingUser: false,
          expiresAt: '2099-01-01T00:00:00Z',
        },
      }),
    });
    renderRoutes([{ path: '/invitations/:token', element: <AcceptInvitationPage /> }], `/invitations/${TOKEN}`);
    expect(await screen.findByRole('heading', { name: 'Join Kestrel Coast' })).toBeInTheDocument();
    await userEvent.type(screen.getByLabelText('Password'), 'short');
    await userEvent.type(screen.getByLabelText('Repeat the password'), 'other');
    await userEvent.click(screen.getByRole('button', { name: 'Accept and create my account' }));
    expect(await screen.findByText('Enter your name')).toBeInTheDocument();
    expect(screen.getByText('Use at least 10 characters')).toBeInTheDocument();
    expect(screen.getByText('The passwords do not match')).toBeInTheDocument();
    expect(calls.filter((c) => c.method === 'POST')).toHaveLength(0);
  });

  it('shows the expired-link page for a used or expired link', async () => {
    mockApi({ 'GET /api/session': noSession, [`GET /api/invitations/${TOKEN}`]: gone });
    renderRoutes([{ path: '/invitations/:token', element: <AcceptInvitationPage /> }], `/invitations/${TOKEN}`);
    expect(await screen.findByRole('heading', { name: 'This link has expired' })).toBeInTheDocument();
  });
});

describe('reset-password page', () => {
  it('shows the expired-link page when the link was used meanwhile', async () => {
    const calls = mockApi({
      [`GET /api/password-resets/${TOKEN}`]: () => ({
        status: 200,
        body: { email: 'someone@example.test', expiresAt: '2099-01-01T00:00:00Z' },
      }),
      [`POST /api/password-resets/${TOKEN}`]: gone,
    });
    renderRoutes([{ path: '/reset-password/:token', element: <ResetPasswordPage /> }], `/reset-password/${TOKEN}`);
    await userEvent.type(await screen.findByLabelText('New password'), 'a-new-password');
    await userEvent.type(screen.getByLabelText('Repeat the new password'), 'a-new-password');
    await userEvent.click(screen.getByRole('button', { name: 'Save the new password' }));
    await waitFor(() => expect(screen.getByRole('heading', { name: 'This link has expired' })).toBeInTheDocument());
    expect(calls.find((c) => c.method === 'POST')?.body).toEqual({ password: 'a-new-password', confirmPassword: 'a-new-password' });
  });
});

describe('page access', () => {
  const as = (role: 'lead' | 'classifier' | 'researcher', classifierCode: string | null = null) => ({
    federation: { id: 1, slug: 'k', name: 'K' },
    role,
    classifierCode,
  });
  it('lets a classifier open only their own classifier page, and keeps lead pages to leads', () => {
    expect(pageAllowed(as('classifier', 'C03'), '/classifiers/C03')).toBe(true);
    expect(pageAllowed(as('classifier', 'C03'), '/classifiers/C05')).toBe(false);
    expect(pageAllowed(as('classifier', 'C03'), '/members')).toBe(false);
    expect(pageAllowed(as('classifier', 'C03'), '/me')).toBe(true);
    expect(pageAllowed(as('researcher'), '/outbox')).toBe(false);
    expect(pageAllowed(as('lead'), '/classifiers/C05')).toBe(true);
    expect(pageAllowed(as('lead'), '/members')).toBe(true);
    expect(pageAllowed(as('researcher'), '')).toBe(true);
  });
});
