import { expect, test, type Page } from '@playwright/test';

/**
 * The shared patterns as a lead meets them: a destructive action asks first (and Cancel keeps
 * things as they were), filters stay chosen from page to page, and a dropped connection shows an
 * error with a button that tries again.
 */
async function signInAsLead(page: Page) {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('lead@demo.panelwise.test');
  await page.getByLabel('Password').fill('panelwise-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(/\/f\/kestrel-coast/);
}

test('revoking an API token asks first, naming the consequence; Cancel and Escape keep it, confirming revokes it', async ({ page }) => {
  await signInAsLead(page);
  await page.goto('/f/kestrel-coast/members');
  const name = `Registration ${Date.now()}`;
  const form = page.getByRole('form', { name: 'Create an API token' });
  await form.getByLabel('System').fill(name);
  await form.getByRole('button', { name: 'Create a token' }).click();
  await expect(page.getByTestId('new-api-token')).toBeVisible();
  await page.getByRole('button', { name: 'I have stored it' }).click();

  const tokens = page.getByRole('table', { name: 'API tokens' });
  const revoke = tokens.getByRole('button', { name: `Revoke the token ${name}` });
  await revoke.click();
  const dialog = page.getByRole('dialog', { name: `Revoke the token “${name}”?` });
  await expect(dialog).toBeVisible();
  await expect(dialog).toContainText('is refused from now on');
  await expect(dialog).toContainText('cannot be undone');
  // Focus starts on the safe choice.
  await expect(dialog.getByRole('button', { name: 'Cancel' })).toBeFocused();
  await page.screenshot({ path: 'test-results/e2e/screens/confirm-revoke-token.png' });
  await dialog.getByRole('button', { name: 'Cancel' }).click();
  await expect(dialog).toBeHidden();
  await expect(revoke).toBeFocused();
  await expect(revoke).toBeVisible();

  await revoke.click();
  await expect(dialog).toBeVisible();
  await page.keyboard.press('Escape');
  await expect(dialog).toBeHidden();
  await expect(revoke).toBeVisible();

  await revoke.click();
  await dialog.getByRole('button', { name: 'Revoke the token' }).click();
  await expect(tokens.getByRole('row').filter({ hasText: name })).toContainText('Revoked');
});

test('deactivating a member and replacing a pending invitation ask first', async ({ page }) => {
  await signInAsLead(page);
  await page.goto('/f/kestrel-coast/members');
  await page.getByRole('button', { name: 'Deactivate Demo Researcher' }).click();
  const deactivate = page.getByRole('dialog', { name: 'Deactivate Demo Researcher?' });
  await expect(deactivate).toContainText('loses Kestrel Coast Wheelchair Basketball Federation at once');
  await deactivate.getByRole('button', { name: 'Cancel' }).click();
  await expect(page.getByRole('table', { name: 'Members' }).getByRole('row').filter({ hasText: 'Demo Researcher' })).not.toContainText(
    'Deactivated',
  );

  const email = `heron.quay.${Date.now()}@example.test`;
  const invite = page.getByRole('form', { name: 'Invite someone' });
  await invite.getByLabel('E-mail').fill(email);
  await invite.getByLabel('Role').selectOption('researcher');
  await invite.getByRole('button', { name: 'Send the invitation' }).click();
  await expect(page.getByRole('status').filter({ hasText: `Invitation sent to ${email}` })).toBeVisible();

  await invite.getByLabel('E-mail').fill(email);
  await invite.getByLabel('Role').selectOption('researcher');
  await invite.getByRole('button', { name: 'Send the invitation' }).click();
  const replace = page.getByRole('dialog', { name: `Replace the pending invitation of ${email}?` });
  await expect(replace).toContainText('the link in the earlier e-mail will stop working');
  await replace.getByRole('button', { name: 'Keep the earlier one' }).click();
  await expect(replace).toBeHidden();
  await expect(page.getByRole('table', { name: 'Pending invitations' }).getByRole('row').filter({ hasText: email })).toHaveCount(1);
  await invite.getByRole('button', { name: 'Send the invitation' }).click();
  await replace.getByRole('button', { name: 'Send a new invitation' }).click();
  await expect(page.getByRole('status').filter({ hasText: `Invitation sent to ${email}` })).toBeVisible();
  await expect(page.getByRole('table', { name: 'Pending invitations' }).getByRole('row').filter({ hasText: email })).toHaveCount(1);
});

test('a season chosen on the overview still applies on Classifiers, Pairs and back', async ({ page }) => {
  await signInAsLead(page);
  await page.goto('/f/kestrel-coast');
  await page.getByLabel('Season').selectOption('2024');
  await expect(page).toHaveURL(/season=2024/);
  const nav = page.getByRole('navigation', { name: 'Federation' });
  await nav.getByRole('link', { name: 'Classifiers' }).click();
  await expect(page).toHaveURL(/\/classifiers\?season=2024$/);
  await expect(page.getByLabel('Season')).toHaveValue('2024');
  await page.getByRole('link', { name: 'C05', exact: true }).click();
  await expect(page).toHaveURL(/\/classifiers\/C05\?season=2024$/);
  await nav.getByRole('link', { name: 'Members' }).click();
  await nav.getByRole('link', { name: 'Pairs' }).click();
  await expect(page).toHaveURL(/\/pairs\?season=2024$/);
  await expect(page.getByLabel('Season')).toHaveValue('2024');
  await nav.getByRole('link', { name: 'Overview' }).click();
  await expect(page.getByLabel('Season')).toHaveValue('2024');
  await page.getByRole('button', { name: 'Clear filters' }).click();
  await nav.getByRole('link', { name: 'Drift' }).click();
  await expect(page).toHaveURL(/\/drift$/);
});

test('with the connection dropped a page shows an error and a retry, not “Computing…” for good', async ({ page }) => {
  await signInAsLead(page);
  await page.route('**/api/federations/kestrel-coast/analytics/**', (route) => route.abort('internetdisconnected'));
  await page.goto('/f/kestrel-coast/boundaries');
  const error = page.getByRole('alert').filter({ hasText: 'could not be reached' });
  await expect(error).toBeVisible({ timeout: 20_000 });
  await expect(page.getByRole('status').filter({ hasText: 'Computing' })).toHaveCount(0);
  await page.screenshot({ path: 'test-results/e2e/screens/offline-error.png' });

  await page.unroute('**/api/federations/kestrel-coast/analytics/**');
  await error.getByRole('button', { name: 'Try again' }).click();
  await expect(page.getByRole('heading', { name: 'Panels split across each class boundary' })).toBeVisible({ timeout: 20_000 });
  await expect(page.getByRole('alert').filter({ hasText: 'could not be reached' })).toHaveCount(0);
});

test('accepting an invitation leads to the federation without asking for the spent link again', async ({ page }) => {
  await signInAsLead(page);
  const email = `pip.marram.${Date.now()}@example.test`;
  const answer = await page.request.post('/api/federations/kestrel-coast/invitations', { data: { email, role: 'researcher' } });
  expect(answer.status()).toBe(201);
  const outbox = await (await page.request.get('/api/federations/kestrel-coast/outbox')).json();
  const message = (outbox.messages as { to: string; links: string[] }[]).find((m) => m.to === email)!;
  // Sign out and wait for the answer: a sign-out still in flight would clear the new account's cookie when it lands.
  expect((await page.request.delete('/api/session')).status()).toBe(204);
  await page.context().clearCookies();

  const failed: string[] = [];
  page.on('response', (r) => {
    if (r.status() >= 400) failed.push(`${r.status()} ${new URL(r.url()).pathname}`);
  });
  page.on('console', (m) => {
    if (m.type() === 'error') failed.push(m.text());
  });
  await page.goto(new URL(message.links[0]).pathname);
  await page.getByLabel('Your name').fill('Pip Marram');
  await page.getByLabel('Password', { exact: true }).fill('pip-marram-password');
  await page.getByLabel('Repeat the password').fill('pip-marram-password');
  await page.getByRole('button', { name: 'Accept and create my account' }).click();
  await expect(page).toHaveURL(/\/f\/kestrel-coast\/?$/);
  await expect(page.getByRole('heading', { level: 1 })).toBeVisible();
  await page.waitForTimeout(500);
  expect(failed).toEqual([]);
});
