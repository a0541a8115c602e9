import AxeBuilder from '@axe-core/playwright';
import { expect, test, type Page } from '@playwright/test';
import { DEMO_SCENARIO, generateScenario } from '../../server/demo/generator';

/**
 * The agreement dashboards as each role sees them: every page opens, shows its figures, passes
 * an accessibility check without serious or critical violations, and is saved as a screenshot in
 * test-results/e2e/screens/. A classifier sees only their own figures; a researcher sees no code
 * or name of any classifier or athlete.
 */
const demo = generateScenario(DEMO_SCENARIO);
const OTHER_CODES = /\bC(0[1-9]|1[013-9]|20)\b/;
const ANY_CODE = /\bC(0[1-9]|1[0-9]|20)\b/;
const ATHLETE_CODE = /\bA\d{4}\b/;

async function signIn(page: Page, role: 'lead' | 'classifier' | 'researcher') {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(`${role}@demo.panelwise.test`);
  await page.getByLabel('Password').fill('panelwise-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(/\/f\/kestrel-coast/);
}

async function check(page: Page, name: string) {
  await expect(page.getByRole('status').filter({ hasText: /Loading|Computing/ })).toHaveCount(0, { timeout: 20_000 });
  await page.waitForTimeout(400);
  await page.screenshot({ path: `test-results/e2e/screens/${name}.png`, fullPage: true });
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

async function pageText(page: Page): Promise<string> {
  return page.locator('body').innerText();
}

test.describe('agreement dashboards', () => {
  test('the lead sees every view', async ({ page }) => {
    await signIn(page, 'lead');
    await page.goto('/f/kestrel-coast');
    await expect(page.getByTestId('count-athletes')).toHaveText('300');
    await expect(page.getByTestId('alpha-value')).toHaveText(/^0\.\d{3}$/);
    await expect(page.getByText(/Fleiss' kappa \(pooled-share generalisation/)).toBeVisible();
    await expect(page.getByText('(Landis & Koch 1977)').first()).toBeVisible();
    await expect(page.getByRole('heading', { name: 'Krippendorff’s alpha (ordinal) by quarter' })).toBeVisible();
    await check(page, 'dashboards-lead-overview');

    // Filters live in the address: a shared link opens the same view.
    await page.getByLabel('Season').selectOption('2024');
    await expect(page).toHaveURL(/season=2024/);
    await expect(page.getByTestId('filtered-assessments')).not.toHaveText('1,933');
    const filtered = await page.getByTestId('filtered-assessments').innerText();
    await page.goto('/f/kestrel-coast?season=2024');
    await expect(page.getByTestId('filtered-assessments')).toHaveText(filtered, { timeout: 30_000 });

    await page.goto('/f/kestrel-coast/classifiers');
    await expect(page.getByRole('table', { name: 'Classifiers against the panel' })).toBeVisible();
    await expect(page.getByRole('link', { name: 'C05', exact: true })).toBeVisible();
    await expect(page.getByRole('columnheader', { name: /Severity \(points\)/ })).toBeVisible();
    await expect(page.getByTestId('severity-explanation')).toContainText('average classifier would for the same athlete');
    await expect(page.getByRole('heading', { name: 'Panel network: assessments shared by each pair of classifiers' })).toBeVisible();
    await check(page, 'dashboards-lead-classifiers');

    await page.getByRole('link', { name: 'C05', exact: true }).click();
    await expect(page.getByRole('heading', { name: /Classifier C05/ })).toBeVisible();
    await expect(page.getByRole('heading', { name: 'Classes given by C05 against the panel’s final class' })).toBeVisible();
    await expect(page.getByTestId('classifier-severity')).toHaveText(/^[+−]?\d\.\d{2}$/);
    await check(page, 'dashboards-lead-classifier-c05');

    await page.goto('/f/kestrel-coast/pairs');
    await expect(page.getByRole('heading', { name: 'Quadratically weighted kappa of each pair of classifiers' })).toBeVisible();
    await page.getByLabel('Filter', { exact: true }).fill('C01');
    await page.getByRole('button', { name: 'Classes of C01 and C02' }).click();
    await expect(page.getByRole('heading', { name: 'C01 and C02', exact: true })).toBeVisible();
    await expect(page).toHaveURL(/pair=C01(~|%7E)C02/);
    await check(page, 'dashboards-lead-pairs');

    await page.goto('/f/kestrel-coast/boundaries');
    await expect(page.getByRole('heading', { name: 'Panels split across each class boundary' })).toBeVisible();
    await check(page, 'dashboards-lead-boundaries');

    await page.goto('/f/kestrel-coast/drift');
    await expect(page.getByRole('heading', { name: 'Rater drift' })).toBeVisible();
    await expect(page.getByRole('heading', { name: 'Class drift' })).toBeVisible();
    await check(page, 'dashboards-lead-drift');

    await page.goto('/f/kestrel-coast/flags');
    await expect(page.getByRole('table', { name: 'Calibration flags' })).toBeVisible();
    await expect(page.getByRole('heading', { name: 'Thresholds' })).toBeVisible();
    const lean = page.getByLabel('Smallest lean worth a flag (points)');
    await lean.fill('3');
    await page.getByRole('button', { name: 'Save thresholds' }).click();
    await expect(page.getByText('Smallest lean worth a flag (points): At most 2 points')).toBeVisible();
    await lean.fill('0.15');
    await check(page, 'dashboards-lead-flags');
  });

  test('the overview shows same-class agreement and points at stake before any weighted coefficient', async ({ page }) => {
    test.setTimeout(120_000);
    await signIn(page, 'lead');
    await page.goto('/f/kestrel-coast');
    const unanimous = page.getByTestId('same-class-unanimous');
    const stake = page.getByTestId('points-at-stake');
    await expect(unanimous).toHaveText(/^\d+\s%$/, { timeout: 60_000 });
    await expect(page.getByTestId('same-class-pairwise')).toHaveText(/^\d+\s%$/);
    await expect(stake).toHaveText(/^\d+$/);
    await expect(page.getByTestId('boundary-splits')).toContainText('2.5/3.0');
    // Document order and position on the page: the trade's figures first, every weighted figure after.
    const weighted = [
      page.getByTestId('alpha-value'),
      page.getByText(/Gwet’s AC2, quadratic/).first(),
      page.getByText(/Panels within half a class/).first(),
    ];
    const firstWeighted = Math.min(...(await Promise.all(weighted.map(async (w) => (await w.boundingBox())!.y))));
    expect((await unanimous.boundingBox())!.y).toBeLessThan(firstWeighted);
    expect((await stake.boundingBox())!.y).toBeLessThan(firstWeighted);
    const order = await page.evaluate(() => {
      const text = document.querySelector('main')!.innerText;
      return {
        unanimous: text.indexOf('Panels unanimous'),
        stake: text.indexOf('Points at stake'),
        alpha: text.indexOf('Krippendorff’s alpha'),
        quadratic: text.search(/quadratic/i),
      };
    });
    expect(order.unanimous).toBeGreaterThanOrEqual(0);
    expect(order.stake).toBeLessThan(order.alpha);
    expect(order.unanimous).toBeLessThan(order.alpha);
    expect(order.stake).toBeLessThan(order.quadratic);
    // The coefficients table: Gwet's AC1 and AC2, alpha with Krippendorff's rule, not Landis & Koch's bands.
    const table = page.getByRole('table', { name: 'Every coefficient, with its interval and what it measures' });
    await expect(table).toBeVisible();
    const alphaRow = table.getByRole('row').filter({ hasText: 'Krippendorff’s alpha, ordinal' });
    await expect(alphaRow).toContainText('Krippendorff (2004)');
    await expect(alphaRow).not.toContainText(/Almost Perfect|Substantial|Moderate/);
    await expect(table.getByRole('row').filter({ hasText: 'Gwet’s AC1' })).toContainText('Landis & Koch');
    await check(page, 'dashboards-lead-overview-headline');
  });

  test('a classifier sees only their own figures', async ({ page }) => {
    await signIn(page, 'classifier');
    await expect(page).toHaveURL(/\/f\/kestrel-coast\/me/);
    await expect(page.getByRole('heading', { name: 'My agreement' })).toBeVisible();
    await expect(page.getByRole('heading', { name: 'You among the federation’s classifiers' })).toBeVisible();
    await expect(page.getByTestId('plain-words')).toContainText('In plain words');
    await expect(page.getByText(/CUSUM/)).toHaveCount(0);
    await expect(page.getByText('How this is computed').first()).toBeVisible();
    await check(page, 'dashboards-classifier-me');
    const text = await pageText(page);
    expect(text).not.toMatch(OTHER_CODES);
    for (const c of demo.classifiers) expect(text).not.toContain(c.displayName);

    for (const [path, name] of [
      ['', 'overview'],
      ['boundaries', 'boundaries'],
      ['drift', 'drift'],
    ] as const) {
      await page.goto(`/f/kestrel-coast/${path}`);
      await check(page, `dashboards-classifier-${name}`);
      const t = await pageText(page);
      expect(t).not.toMatch(OTHER_CODES);
      expect(t).not.toMatch(ATHLETE_CODE);
    }
    await expect(page.getByRole('link', { name: 'Classifiers', exact: true })).toHaveCount(0);

    await page.goto('/f/kestrel-coast/classifiers/C05');
    // The client shows its 403 page; the API refuses the figures too (tests/api/analytics.test.ts).
    await expect(page.getByRole('heading', { name: 'Not available to you' })).toBeVisible();
    expect(await pageText(page)).not.toContain(demo.classifiers.find((c) => c.code === 'C05')!.displayName);
  });

  test('a researcher sees aggregates without any classifier or athlete identity', async ({ page }) => {
    await signIn(page, 'researcher');
    for (const [path, name] of [
      ['', 'overview'],
      ['boundaries', 'boundaries'],
      ['drift', 'drift'],
    ] as const) {
      await page.goto(`/f/kestrel-coast/${path}`);
      await check(page, `dashboards-researcher-${name}`);
      const text = await pageText(page);
      expect(text).not.toMatch(ANY_CODE);
      expect(text).not.toMatch(ATHLETE_CODE);
      for (const c of demo.classifiers) expect(text).not.toContain(c.displayName);
      for (const a of demo.athletes) expect(text).not.toContain(a.displayName);
    }
    await expect(page.getByRole('link', { name: 'Pairs', exact: true })).toHaveCount(0);
    await page.goto('/f/kestrel-coast/pairs');
    await expect(page.getByRole('heading', { name: 'Not available to you' })).toBeVisible();
    expect(await pageText(page)).not.toMatch(ANY_CODE);
  });
});
