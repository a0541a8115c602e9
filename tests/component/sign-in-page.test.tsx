import { screen, waitFor } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import { SignInPage } from '../../src/features/session/components/sign-in-page';
import { mockApi, renderRoutes } from './render';

describe('sign-in page', () => {
  it('names each missing field before sending anything', async () => {
    const calls = mockApi({
      'GET /api/session': () => ({ status: 401, body: { error: { code: 'unauthenticated', message: 'Sign in' } } }),
    });
    renderRoutes([{ path: '/sign-in', element: <SignInPage /> }], '/sign-in');
    await userEvent.click(await screen.findByRole('button', { name: 'Sign in' }));
    expect(await screen.findByText('Enter an e-mail address')).toBeInTheDocument();
    expect(screen.getByText('Enter your password')).toBeInTheDocument();
    expect(calls.filter((c) => c.method === 'POST')).toHaveLength(0);
  });

  it('shows the server’s answer for a wrong password', async () => {
    mockApi({
      'GET /api/session': () => ({ status: 401, body: { error: { code: 'unauthenticated', message: 'Sign in' } } }),
      'POST /api/session': () => ({
        status: 401,
        body: { error: { code: 'unauthenticated', message: 'The e-mail or password is not right' } },
      }),
    });
    renderRoutes([{ path: '/sign-in', element: <SignInPage /> }], '/sign-in');
    await userEvent.type(await screen.findByLabelText('E-mail'), 'lead@demo.panelwise.test');
    await userEvent.type(screen.getByLabelText('Password'), 'wrong');
    await userEvent.click(screen.getByRole('button', { name: 'Sign in' }));
    await waitFor(() => expect(screen.getByRole('alert')).toHaveTextContent('The e-mail or password is not right'));
  });
});
