import { expect, test } from '@playwright/test';

test('opens the built app and sees the sign-in page and the app’s name', async ({ page }) => {
  await page.goto('/');
  await expect(page).toHaveURL(/\/sign-in/);
  await expect(page.getByText('Panelwise', { exact: true })).toBeVisible();
  await expect(page.getByRole('heading', { name: 'Sign in' })).toBeVisible();
});

test('the lead signs in and sees the federation’s counts', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('lead@demo.panelwise.test');
  await page.getByLabel('Password').fill('panelwise-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('heading', { name: 'Kestrel Coast Wheelchair Basketball Federation' })).toBeVisible();
  await expect(page.getByTestId('count-athletes')).toHaveText('300');
  await page.screenshot({ path: 'test-results/e2e/screens/overview-lead.png', fullPage: true });
});
