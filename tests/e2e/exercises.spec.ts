import AxeBuilder from '@axe-core/playwright';
import { expect as baseExpect, test, type Browser, type Page } from '@playwright/test';

/**
 * A calibration exercise end to end in the browser: the lead starts one from the demo
 * classifier's calibration flag, keeps two cases, saves and opens it; the demo classifier answers
 * both blind (no reference class on the page); the lead closes it and sees the scores and the
 * before/after chart. Pages are saved at 1366 px and 390 px wide in test-results/e2e/screens/.
 */
// Two shared cores: pages may take a while to load under other work.
const expect = baseExpect.configure({ timeout: 20_000 });
const WIDE = { width: 1366, height: 900 };
const NARROW = { width: 390, height: 844 };

async function signIn(browser: Browser, role: 'lead' | 'classifier'): Promise<Page> {
  const context = await browser.newContext({ viewport: WIDE });
  const page = await context.newPage();
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(`${role}@demo.panelwise.test`);
  await page.getByLabel('Password').fill('panelwise-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(/\/f\/kestrel-coast/);
  return page;
}

async function settle(page: Page) {
  await expect(page.getByRole('status').filter({ hasText: /^(Loading|Computing|Finding cases)/ })).toHaveCount(0, { timeout: 20_000 });
  await page.waitForTimeout(400);
}

/** Screenshots at both widths, and an accessibility check without serious or critical violations. */
async function check(page: Page, name: string) {
  for (const [label, size] of [
    ['1366', WIDE],
    ['390', NARROW],
  ] as const) {
    await page.setViewportSize(size);
    await settle(page);
    await page.screenshot({ path: `test-results/e2e/screens/${name}-${label}.png`, fullPage: true });
    // The page's own content never makes the page scroll sideways (wide tables scroll in their own box).
    const overflow = await page.evaluate(() => {
      const main = document.querySelector('main')!;
      return main.scrollWidth - main.clientWidth;
    });
    expect(overflow, `${name} at ${label} px: the content is wider than the page`).toBeLessThanOrEqual(1);
  }
  await page.setViewportSize(WIDE);
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

test('a lead creates an exercise from a flag, the classifier completes it blind, the lead closes it and sees scores and the before/after chart', async ({
  browser,
}) => {
  test.setTimeout(600_000);
  const lead = await signIn(browser, 'lead');
  await lead.getByRole('link', { name: 'Exercises' }).first().click();
  await expect(lead.getByRole('heading', { name: 'Calibration exercises' })).toBeVisible();
  await expect(lead.getByRole('link', { name: 'Winter practice: trunk control at 1.0/1.5 and 2.5/3.0' })).toBeVisible();
  await check(lead, 'exercises-lead-list');

  await lead.getByRole('link', { name: 'New exercise' }).click();
  const source = lead.getByLabel('A calibration flag or a class boundary (fills in cases and classifiers)');
  const flagOption = source.locator('option', { hasText: /^C12 / }).first();
  await expect(flagOption).toBeAttached({ timeout: 20_000 });
  await source.selectOption(await flagOption.getAttribute('value'));
  await expect(lead.getByLabel('Title')).toHaveValue(/^Calibration for C12/, { timeout: 20_000 });
  await expect(lead.getByRole('checkbox', { name: /^C12 / })).toBeChecked();
  // Keep two of the proposed cases, with invented descriptions.
  while (
    (await lead.getByRole('button', { name: /^Remove case \d+$/ }).count()) > 1 &&
    (await lead.getByRole('button', { name: 'Remove case 3' }).count()) > 0
  ) {
    await lead.getByRole('button', { name: 'Remove case 3' }).click();
  }
  await lead
    .getByLabel('Description')
    .nth(0)
    .fill('Guard, pushes with short strokes and stops by leaning on the backrest (invented case).');
  await lead.getByLabel('Description').nth(1).fill('Forward, rebounds with one arm, the other holding the wheel (invented case).');
  await lead
    .getByLabel(/^Video link/)
    .nth(0)
    .fill('ftp://not-a-web-link');
  await lead.getByLabel('Title').fill('Browser practice at the boundary');
  await check(lead, 'exercises-lead-new');
  await lead.getByRole('button', { name: 'Save draft' }).click();
  await expect(lead.getByText('The link is not an http(s) address')).toBeVisible();
  await lead
    .getByLabel(/^Video link/)
    .nth(0)
    .fill('https://video.example.invalid/browser-case-1');
  await lead.getByLabel('Reference class').nth(0).selectOption('6');
  await lead.getByLabel('Reference class').nth(1).selectOption('5');
  await lead.getByRole('button', { name: 'Save draft' }).click();
  await expect(lead.getByRole('heading', { name: 'Browser practice at the boundary' })).toBeVisible();
  await lead.getByRole('button', { name: 'Open and send invitations' }).click();
  await expect(lead.getByText('Open', { exact: true }).first()).toBeVisible();
  await expect(lead.getByRole('heading', { name: /Classifiers \(0 of 1 finished\)/ })).toBeVisible();
  const exerciseUrl = lead.url();

  // The classifier answers blind.
  const classifier = await signIn(browser, 'classifier');
  await classifier.getByRole('link', { name: 'Exercises' }).first().click();
  await classifier.getByRole('link', { name: 'Browser practice at the boundary' }).click();
  await expect(classifier.getByTestId('my-progress')).toHaveText(/0 of 2 cases answered/);
  expect(await classifier.locator('body').innerText()).not.toMatch(/Reference class/);
  await check(classifier, 'exercises-classifier-answering');
  await classifier.getByLabel('Your class for case 1').selectOption('6');
  await classifier.getByRole('checkbox', { name: 'Stopping' }).first().check();
  await classifier.getByLabel('Short reason (optional)').first().fill('Leans on the backrest to stop.');
  await classifier.getByRole('button', { name: 'Save case 1' }).click();
  await expect(classifier.getByTestId('my-progress')).toHaveText(/1 of 2 cases answered/);
  await classifier.getByLabel('Your class for case 2').selectOption('6');
  await classifier.getByRole('checkbox', { name: 'Rebounding' }).nth(1).check();
  await classifier.getByRole('button', { name: 'Save case 2' }).click();
  await expect(classifier.getByTestId('my-progress')).toHaveText(/All 2 cases answered/);
  expect(await classifier.locator('body').innerText()).not.toMatch(/Reference class/);

  // The lead closes it and reads the scores and the chart.
  await lead.goto(exerciseUrl);
  await expect(lead.getByRole('heading', { name: /Classifiers \(1 of 1 finished\)/ })).toBeVisible();
  await lead.getByRole('button', { name: 'Close now…' }).click();
  await lead.getByRole('button', { name: 'Close and score' }).click();
  await expect(lead.getByRole('heading', { name: 'Results' })).toBeVisible();
  const scores = lead.getByRole('table', { name: 'Scores per classifier' });
  // C12 answered 3.0 and 3.0 against references 3.0 and 2.5: exact 50 %, within half a point 100 %, bias +0.25.
  await expect(scores.getByRole('row', { name: /C12/ })).toContainText('50 %');
  await expect(scores.getByRole('row', { name: /C12/ })).toContainText('+0.25');
  const chart = lead.getByRole('figure', { name: 'C12: exact agreement with the panel, before and after' });
  await expect(chart).toBeVisible();
  await expect(chart.locator('svg').first()).toBeVisible();
  await expect(lead.getByText('No live-panel rating since the exercise closed yet', { exact: false })).toBeVisible();
  await check(lead, 'exercises-lead-results');
  await lead.setViewportSize(NARROW);
  await chart.scrollIntoViewIfNeeded();
  await chart.screenshot({ path: 'test-results/e2e/screens/exercises-lead-chart-390.png' });
  await lead.setViewportSize(WIDE);

  // The classifier now sees the reference classes and their own scores.
  await classifier.reload();
  await expect(classifier.getByRole('table', { name: 'Your scores' })).toBeVisible();
  await expect(classifier.getByText('Reference class 2.5')).toBeVisible();

  // The demo's closed exercise shows the before/after comparison with ratings on both sides.
  await lead.getByRole('link', { name: '← Exercises' }).click();
  await lead.getByRole('link', { name: 'Winter practice: trunk control at 1.0/1.5 and 2.5/3.0' }).click();
  await expect(lead.getByRole('figure', { name: 'C05: exact agreement with the panel, before and after' })).toBeVisible();
  await check(lead, 'exercises-lead-demo-results');
});
