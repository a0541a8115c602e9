import AxeBuilder from '@axe-core/playwright';
import { expect, test, type Page } from '@playwright/test';

async function expectAccessible(page: Page) {
  const results = await new AxeBuilder({ page }).analyze();
  const serious = results.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
  expect(
    serious.map(
      (v) =>
        `${v.id}: ${v.help} (${v.nodes
          .map((n) => n.target.join(' '))
          .slice(0, 3)
          .join(', ')})`,
    ),
  ).toEqual([]);
}

test('the lead invites a classifier; the classifier accepts through the e-mailed link, lands on their own page and cannot open another classifier’s', async ({
  page,
}) => {
  const email = `wren.alder.${Date.now()}@example.test`;

  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('lead@demo.panelwise.test');
  await page.getByLabel('Password').fill('panelwise-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('navigation', { name: 'Federation' }).getByRole('link', { name: 'Members' }).click();
  await expect(page.getByRole('heading', { name: 'Members and access' })).toBeVisible();
  await expectAccessible(page);

  const invite = page.getByRole('form', { name: 'Invite someone' });
  await invite.getByLabel('E-mail').fill(email);
  await invite.getByLabel('Role').selectOption('classifier');
  await invite.getByLabel('Roster entry').selectOption('C03');
  await invite.getByRole('button', { name: 'Send the invitation' }).click();
  await expect(page.getByRole('status').filter({ hasText: `Invitation sent to ${email}` })).toBeVisible();
  await expect(page.getByRole('table', { name: 'Pending invitations' }).getByRole('cell', { name: email, exact: true })).toBeVisible();
  await page.screenshot({ path: 'test-results/e2e/screens/members-lead.png', fullPage: true });

  // The Outbox keeps the message the local mail server received, with its link.
  await page.getByRole('link', { name: /Outbox/ }).click();
  await expect(page.getByRole('heading', { name: 'Outbox', level: 1 })).toBeVisible();
  const message = page.getByRole('listitem').filter({ hasText: `To ${email}` });
  await expect(message.getByRole('heading', { name: /Invitation to Kestrel Coast/ })).toBeVisible();
  const link = await message.getByTestId('outbox-link').first().getAttribute('href');
  expect(link).toMatch(/\/invitations\/[A-Za-z0-9_-]{43}$/);
  const invitationPath = new URL(link!).pathname;

  await page.getByRole('button', { name: 'Sign out' }).click();
  await expect(page).toHaveURL(/\/sign-in/);

  await page.goto(invitationPath);
  await expect(page.getByRole('heading', { name: 'Join Kestrel Coast Wheelchair Basketball Federation' })).toBeVisible();
  await expect(page.getByText('roster entry C03')).toBeVisible();
  await expectAccessible(page);
  await page.getByLabel('Your name').fill('Wren Alder');
  await page.getByLabel('Password', { exact: true }).fill('wren-alder-password');
  await page.getByLabel('Repeat the password').fill('wren-alder-password');
  await page.getByRole('button', { name: 'Accept and create my account' }).click();

  await expect(page).toHaveURL(/\/f\/kestrel-coast\/me$/);
  await expect(page.getByRole('heading', { name: 'My agreement' })).toBeVisible();
  await expect(page.getByRole('navigation', { name: 'Federation' }).getByRole('link', { name: 'Members' })).toHaveCount(0);

  // Another classifier's page: the 403 page, and the API answers 403 too.
  await page.goto('/f/kestrel-coast/classifiers/C05');
  await expect(page.getByRole('heading', { name: 'Not available to you' })).toBeVisible();
  expect((await page.request.get('/api/federations/kestrel-coast/analytics/classifiers/C05')).status()).toBe(403);
  expect((await page.request.get('/api/federations/kestrel-coast/analytics/classifiers/C03')).status()).toBe(200);
  await page.goto('/f/kestrel-coast/members');
  await expect(page.getByRole('heading', { name: 'Not available to you' })).toBeVisible();

  // The link worked once.
  await page.goto(invitationPath);
  await expect(page.getByRole('heading', { name: 'This link has expired' })).toBeVisible();
});

test('forgot password: the reset link from the Outbox sets a new password', async ({ page, request }) => {
  // A researcher of our own, invited and accepted through the API, so the demo accounts keep their password.
  const email = `reset.${Date.now()}@example.test`;
  expect((await request.post('/api/session', { data: { email: 'lead@demo.panelwise.test', password: 'panelwise-demo' } })).status()).toBe(
    201,
  );
  expect((await request.post('/api/federations/kestrel-coast/invitations', { data: { email, role: 'researcher' } })).status()).toBe(201);
  const invitations = (await (await request.get('/api/federations/kestrel-coast/outbox')).json()) as {
    messages: { to: string; links: string[] }[];
  };
  const token = invitations.messages
    .find((m) => m.to === email)!
    .links[0].split('/')
    .pop();
  const accepted = await request.post(`/api/invitations/${token}/accept`, {
    data: { displayName: 'Ash Reset', password: 'first-password-1', confirmPassword: 'first-password-1' },
  });
  expect(accepted.status()).toBe(201);

  await page.goto('/sign-in');
  await page.getByRole('link', { name: 'Forgot your password?' }).click();
  await page.getByLabel('E-mail').fill(email);
  await page.getByRole('button', { name: 'Send the link' }).click();
  await expect(page.getByRole('heading', { name: 'Check your e-mail' })).toBeVisible();
  await expectAccessible(page);

  // Reset messages belong to no federation: the site owner's Outbox lists them.
  const owner = await request.post('/api/session', { data: { email: 'owner@demo.panelwise.test', password: 'panelwise-demo' } });
  expect(owner.status()).toBe(201);
  let link: string | undefined;
  await expect(async () => {
    const outbox = (await (await request.get('/api/owner/outbox')).json()) as {
      messages: { to: string; subject: string; links: string[] }[];
    };
    link = outbox.messages.find((m) => m.to === email && m.subject.includes('password'))?.links[0];
    expect(link).toBeDefined();
  }).toPass({ timeout: 10_000 });

  await page.goto(new URL(link!).pathname);
  await expect(page.getByRole('heading', { name: 'Choose a new password' })).toBeVisible();
  await page.getByLabel('New password', { exact: true }).fill('researcher-new-password');
  await page.getByLabel('Repeat the new password').fill('researcher-new-password');
  await page.getByRole('button', { name: 'Save the new password' }).click();
  await expect(page.getByText('Your new password is saved')).toBeVisible();
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill('researcher-new-password');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('heading', { name: 'Kestrel Coast Wheelchair Basketball Federation' })).toBeVisible();
});
