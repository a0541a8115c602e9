import fs from 'node:fs';
import AxeBuilder from '@axe-core/playwright';
import { expect, test } from '@playwright/test';

test('the researcher builds an anonymised export, downloads it, and finds no classifier code in it', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('researcher@demo.panelwise.test');
  await page.getByLabel('Password').fill('panelwise-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('link', { name: 'Research export' }).click();
  await expect(page.getByRole('heading', { name: 'Research export', level: 1 })).toBeVisible();
  await expect(page.getByRole('heading', { name: 'Build an export' })).toBeVisible();

  // Researchers choose events by level; no individual event, and no lead settings, are offered.
  await expect(page.getByRole('group', { name: 'Event levels' })).toBeVisible();
  await expect(page.getByLabel(/Individual events/)).toHaveCount(0);
  await expect(page.getByRole('heading', { name: /Export settings/ })).toHaveCount(0);
  await expect(page.locator('body')).not.toContainText(/S\d{4}-(R\d|CUP|CH)|League round|Coastal Cup/);

  await page.getByRole('group', { name: 'Seasons' }).getByLabel('2022–23').uncheck();
  await page.getByRole('button', { name: 'Build export' }).click();
  const ready = page.getByRole('heading', { name: /Export \d+ is ready/ });
  await expect(ready).toBeVisible();

  const downloadPromise = page.waitForEvent('download');
  await page
    .getByRole('status')
    .getByRole('link', { name: /^CSV of export/ })
    .click();
  const download = await downloadPromise;
  expect(download.suggestedFilename()).toMatch(/^research-export-\d+\.csv$/);
  const csv = fs.readFileSync(await download.path(), 'utf8');
  expect(csv.split('\r\n')[0]).toBe(
    'assessment,athlete,classifier,sport_class,panel_class,kind,season,event,event_level,category,assessed_month',
  );
  expect(csv.length).toBeGreaterThan(50_000);
  expect(csv).not.toMatch(/C\d{2}/); // the demo's classifier codes are C01 … C20
  expect(csv).not.toContain('2022-23');

  await expect(page.getByRole('table', { name: 'My exports' })).toContainText('2023–24');
  await page.screenshot({ path: 'test-results/e2e/screens/exports-researcher.png', fullPage: true });

  const results = await new AxeBuilder({ page }).analyze();
  const serious = results.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
  expect(serious.map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`)).toEqual([]);
});

test('the lead sees the settings for k and studies on the same page', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('lead@demo.panelwise.test');
  await page.getByLabel('Password').fill('panelwise-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('link', { name: 'Research export' }).click();
  await expect(page.getByRole('heading', { name: 'Export settings (leads only)' })).toBeVisible();
  await page.getByLabel('Study name').fill('Boundary study');
  await page.getByRole('button', { name: 'Create study' }).click();
  await expect(page.getByRole('button', { name: 'Close Boundary study' })).toBeVisible();
  await expect(page.getByLabel('Study', { exact: true }).locator('option', { hasText: 'Boundary study' })).toHaveCount(1);
  await page.screenshot({ path: 'test-results/e2e/screens/exports-lead.png', fullPage: true });
  const results = await new AxeBuilder({ page }).analyze();
  expect(results.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical').map((v) => v.id)).toEqual([]);
});
