import AxeBuilder from '@axe-core/playwright';
import path from 'node:path';
import { expect, test, type Page } from '@playwright/test';

/**
 * The lead imports panel decisions: uploads an invented fixture, matches a column the guess
 * cannot place, sees the dry run's errors, uploads the corrected file, commits it and sees the
 * overview's counts change; then reverts the import and sees them return. Screenshots go to
 * test-results/e2e/screens/.
 */
const fixtures = path.resolve(import.meta.dirname, '../../fixtures/imports');
const shot = (page: Page, name: string) => page.screenshot({ path: `test-results/e2e/screens/${name}.png`, fullPage: true });

async function axe(page: Page) {
  const results = await new AxeBuilder({ page }).analyze();
  const bad = results.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical');
  expect(
    bad.map(
      (v) =>
        `${v.id}: ${v.help} (${v.nodes
          .map((n) => n.target.join(' '))
          .slice(0, 3)
          .join(', ')})`,
    ),
  ).toEqual([]);
}

async function counts(page: Page) {
  await page.goto('/f/kestrel-coast');
  await expect(page.getByTestId('count-assessments')).toBeVisible({ timeout: 20_000 });
  const read = async (id: string) => Number((await page.getByTestId(id).innerText()).replace(/[^\d]/g, ''));
  return { assessments: await read('count-assessments'), ratings: await read('count-ratings') };
}

test('the lead uploads, maps, fixes, commits and reverts an import', async ({ page }) => {
  test.setTimeout(120_000);
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('lead@demo.panelwise.test');
  await page.getByLabel('Password').fill('panelwise-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(/\/f\/kestrel-coast/);
  const before = await counts(page);

  await page.getByRole('link', { name: 'Imports' }).click();
  await expect(page.getByRole('heading', { name: 'Imports', level: 1 })).toBeVisible();
  await expect(page.getByRole('table', { name: 'Import history' })).toBeVisible();

  // A file with a column the guess cannot place, and a class of 3.25 on row 5.
  await page.getByLabel('Choose a CSV file').setInputFiles(path.join(fixtures, 'e2e-with-errors.csv'));
  await expect(page.getByText('First 8 rows of e2e-with-errors.csv')).toBeVisible();
  await page.getByRole('button', { name: 'Check the file' }).click();
  await expect(page.getByRole('alert').filter({ hasText: 'Choose what the column “Remarks” holds' })).toBeVisible();
  await shot(page, 'imports-mapping');
  await axe(page);
  await page.getByLabel('Column “Remarks”').selectOption({ label: 'Note' });
  await page.getByRole('button', { name: 'Check the file' }).click();
  await expect(page.getByText(/The file was refused and nothing was imported: 1 problem/)).toBeVisible({ timeout: 20_000 });
  const problems = page.getByRole('table', { name: 'Problems found in the file' });
  await expect(problems.getByRole('row').nth(1)).toContainText('5');
  await expect(problems).toContainText('sport_class');
  await expect(problems).toContainText('3.25');
  await expect(problems).toContainText('is not a half-point class');
  await shot(page, 'imports-dry-run-errors');
  await axe(page);

  // The corrected file: same columns, so the mapping stays.
  await page.getByLabel('Choose a CSV file').setInputFiles(path.join(fixtures, 'e2e-corrected.csv'));
  await expect(page.getByLabel('Column “Remarks”')).toHaveValue('note');
  await page.getByLabel('Save this mapping as').fill('Regional office sheet');
  await page.getByRole('button', { name: 'Save mapping' }).click();
  await expect(page.getByText('Saved as “Regional office sheet” for the next upload.')).toBeVisible();
  await page.getByRole('button', { name: 'Check the file' }).click();
  await expect(page.getByText('The file passed every check.')).toBeVisible({ timeout: 20_000 });
  await expect(page.getByTestId('dry-assessments-new')).toHaveText('3');
  await expect(page.getByTestId('dry-ratings-new')).toHaveText('8');
  await shot(page, 'imports-dry-run-ready');
  await page.getByRole('button', { name: 'Commit the import' }).click();
  await expect(page.getByText(/Import #\d+ is committed: 3 new and 0 changed assessments, 8 new ratings/)).toBeVisible({ timeout: 30_000 });
  await expect(page.getByRole('table', { name: 'Import history' })).toContainText('e2e-corrected.csv');
  await shot(page, 'imports-committed');

  await page.getByRole('link', { name: 'See the overview' }).click();
  await expect(page.getByTestId('count-assessments')).toHaveText(new Intl.NumberFormat('en').format(before.assessments + 3), {
    timeout: 20_000,
  });
  await expect(page.getByTestId('count-ratings')).toHaveText(new Intl.NumberFormat('en').format(before.ratings + 8));
  await shot(page, 'imports-overview-after-commit');

  // Revert, with confirmation.
  await page.getByRole('link', { name: 'Imports' }).click();
  const history = page.getByRole('table', { name: 'Import history' });
  const row = history.getByRole('row').filter({ hasText: 'e2e-corrected.csv' });
  await row.getByRole('button', { name: /Revert import #\d+/ }).click();
  const dialog = page.getByRole('alertdialog');
  await expect(dialog).toContainText('removes exactly what the import added');
  await shot(page, 'imports-revert-confirm');
  await axe(page);
  await dialog.getByRole('button', { name: 'Revert import' }).click();
  await expect(page.getByText(/Import #\d+ was reverted\./)).toBeVisible({ timeout: 20_000 });
  await expect(row).toContainText('Reverted');

  const after = await counts(page);
  expect(after).toEqual(before);
  await shot(page, 'imports-overview-after-revert');
});

test('the Imports page is for leads only', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('classifier@demo.panelwise.test');
  await page.getByLabel('Password').fill('panelwise-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(/\/f\/kestrel-coast/);
  await expect(page.getByRole('link', { name: 'Imports' })).toHaveCount(0);
});
