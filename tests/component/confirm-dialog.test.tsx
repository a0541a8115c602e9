import { screen, waitFor } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { useState } from 'react';
import { describe, expect, it } from 'vitest';
import { useConfirm } from '../../src/components/confirm-dialog';
import { renderWithProviders } from './render';

function Revoker() {
  const { confirm, dialog } = useConfirm();
  const [state, setState] = useState('active');
  return (
    <div>
      <p>Token is {state}</p>
      <button
        type="button"
        onClick={async () => {
          const ok = await confirm({
            title: 'Revoke the token “Registration”?',
            consequence: <p>Every request with it is refused from now on.</p>,
            confirmLabel: 'Revoke the token',
          });
          setState(ok ? 'revoked' : 'kept');
        }}
      >
        Revoke
      </button>
      {dialog}
    </div>
  );
}

describe('the confirmation dialog', () => {
  it('names the consequence, starts on Cancel, and acts only when confirmed', async () => {
    const user = userEvent.setup();
    renderWithProviders(<Revoker />);
    await user.click(screen.getByRole('button', { name: 'Revoke' }));
    const dialog = await screen.findByRole('dialog', { name: 'Revoke the token “Registration”?' });
    expect(dialog).toHaveAccessibleDescription('Every request with it is refused from now on.');
    expect(screen.getByRole('button', { name: 'Cancel' })).toHaveFocus();
    await user.click(screen.getByRole('button', { name: 'Cancel' }));
    await waitFor(() => expect(screen.getByText('Token is kept')).toBeInTheDocument());
    expect(screen.getByRole('button', { name: 'Revoke' })).toHaveFocus();

    await user.click(screen.getByRole('button', { name: 'Revoke' }));
    await user.click(await screen.findByRole('button', { name: 'Revoke the token' }));
    await waitFor(() => expect(screen.getByText('Token is revoked')).toBeInTheDocument());
  });
});
