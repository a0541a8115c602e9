import { expect, test, type Page } from '@playwright/test';

/**
 * Every page as each demo role on a phone (390 × 844): the page never scrolls sideways (wide
 * tables and charts scroll inside their own box), every page has its own document title, and
 * nothing is written to the console as an error and no request fails unexpectedly. Screenshots go
 * to test-results/e2e/screens/phone-*.png.
 */
test.use({ viewport: { width: 390, height: 844 } });

type Role = 'lead' | 'classifier' | 'researcher' | 'owner';

const PAGES: Record<Role, string[]> = {
  lead: [
    '/f/kestrel-coast',
    '/f/kestrel-coast/classifiers',
    '/f/kestrel-coast/classifiers/C05',
    '/f/kestrel-coast/pairs',
    '/f/kestrel-coast/pairs?pair=C01~C02',
    '/f/kestrel-coast/boundaries',
    '/f/kestrel-coast/drift',
    '/f/kestrel-coast/flags',
    '/f/kestrel-coast/members',
    '/f/kestrel-coast/outbox',
    '/f/kestrel-coast/exports',
    '/f/kestrel-coast/imports',
    '/f/kestrel-coast/exercises',
    '/f/kestrel-coast/exercises/new',
    '/f/kestrel-coast/exercises/1',
    '/f/kestrel-coast/exercises/2',
    '/f/kestrel-coast/help',
  ],
  classifier: [
    '/f/kestrel-coast/me',
    '/f/kestrel-coast',
    '/f/kestrel-coast/classifiers/C12',
    '/f/kestrel-coast/boundaries',
    '/f/kestrel-coast/drift',
    '/f/kestrel-coast/exercises',
    '/f/kestrel-coast/exercises/2',
    '/f/kestrel-coast/help',
  ],
  researcher: [
    '/f/kestrel-coast',
    '/f/kestrel-coast/boundaries',
    '/f/kestrel-coast/drift',
    '/f/kestrel-coast/exports',
    '/f/kestrel-coast/help',
  ],
  owner: ['/owner'],
};
const PUBLIC_PAGES = ['/sign-in', '/forgot-password', '/expired', '/no-such-page'];

/** Console errors, React Router warnings and failed responses while the page is used. */
function watch(page: Page) {
  const problems: string[] = [];
  page.on('console', (msg) => {
    if (msg.type() === 'error') problems.push(`console error: ${msg.text()}`);
    if (msg.type() === 'warning' && /HydrateFallback|React Router/.test(msg.text())) problems.push(`console warning: ${msg.text()}`);
  });
  page.on('pageerror', (error) => problems.push(`page error: ${error.message}`));
  page.on('response', (response) => {
    if (response.status() >= 400)
      problems.push(`${response.status()} from ${response.request().method()} ${new URL(response.url()).pathname}`);
  });
  return problems;
}

async function settle(page: Page) {
  await expect(page.getByRole('status').filter({ hasText: /Loading|Computing/ })).toHaveCount(0, { timeout: 30_000 });
  await expect(page.locator('h1').first()).toBeVisible();
  // Charts draw once they know their width.
  await page.waitForTimeout(300);
}

async function sideways(page: Page): Promise<{ scrollWidth: number; clientWidth: number; widest: string }> {
  return page.evaluate(() => {
    const root = document.documentElement;
    let widest = '';
    let right = root.clientWidth;
    for (const el of Array.from(document.body.querySelectorAll('*'))) {
      const box = el.getBoundingClientRect();
      if (box.right > right + 0.5 && !el.closest('.overflow-x-auto, .plot-holder, .data-table-box')) {
        right = box.right;
        widest = `${el.tagName.toLowerCase()}.${String(el.getAttribute('class') ?? '')
          .split(' ')
          .slice(0, 3)
          .join('.')} (${Math.round(box.right)} px)`;
      }
    }
    return { scrollWidth: root.scrollWidth, clientWidth: root.clientWidth, widest };
  });
}

async function visit(page: Page, path: string, name: string, problems: string[]) {
  const before = problems.length;
  await page.goto(path);
  await settle(page);
  const width = await sideways(page);
  expect(width.scrollWidth, `${path} scrolls sideways; widest: ${width.widest}`).toBeLessThanOrEqual(width.clientWidth);
  await page.screenshot({ path: `test-results/e2e/screens/phone-${name}.png`, fullPage: true });
  expect(problems.slice(before), `problems on ${path}`).toEqual([]);
  return page.title();
}

async function signIn(page: Page, role: Role) {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(`${role}@demo.panelwise.test`);
  await page.getByLabel('Password').fill('panelwise-demo');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(role === 'owner' ? /\/owner$/ : /\/f\/kestrel-coast/);
  await settle(page);
}

const slug = (path: string) =>
  path
    .replace(/^\/(f\/kestrel-coast)?\/?/, '')
    .replace(/[^a-z0-9]+/gi, '-')
    .replace(/-$/, '') || 'overview';

test('the public pages fit a phone, have their own titles and log no error', async ({ page }) => {
  const problems = watch(page);
  const titles: string[] = [];
  for (const path of PUBLIC_PAGES) titles.push(await visit(page, path, `public-${slug(path)}`, problems));
  expect(titles.every((t) => t.endsWith(' · Panelwise'))).toBe(true);
  expect(new Set(titles).size, titles.join(' | ')).toBe(titles.length);
});

for (const role of ['lead', 'classifier', 'researcher', 'owner'] as const) {
  test(`every page of the ${role} fits a phone, has its own title and logs no error`, async ({ page }) => {
    test.setTimeout(60_000 + PAGES[role].length * 20_000);
    const problems = watch(page);
    await signIn(page, role);
    expect(problems, 'signing in').toEqual([]);
    const titles: string[] = [];
    for (const path of PAGES[role]) titles.push(await visit(page, path, `${role}-${slug(path)}`, problems));
    expect(titles.every((t) => / · Panelwise$/.test(t) && t !== 'Panelwise')).toBe(true);
    if (role !== 'owner') expect(titles.every((t) => t.includes(' · Kestrel Coast · '))).toBe(true);
    // The chosen pair is the same page as the pairs list: leave it out of the distinct titles.
    const distinct = titles.filter((_, i) => !PAGES[role][i].includes('?'));
    expect(new Set(distinct).size, distinct.join(' | ')).toBe(distinct.length);

    if (role !== 'owner') {
      // The navigation is behind a menu button on a phone.
      const menu = page.getByRole('button', { name: 'Menu' });
      await expect(menu).toHaveAttribute('aria-expanded', 'false');
      await expect(page.getByRole('navigation', { name: 'Federation' })).toBeHidden();
      await menu.click();
      await expect(page.getByRole('navigation', { name: 'Federation' })).toBeVisible();
      await page.screenshot({ path: `test-results/e2e/screens/phone-${role}-menu.png` });
      await page.getByRole('navigation', { name: 'Federation' }).getByRole('link', { name: 'Drift' }).click();
      await expect(page).toHaveURL(/\/drift$/);
      await expect(page.getByRole('navigation', { name: 'Federation' })).toBeHidden();
    }
  });
}

test('the lead’s Members page is usable on a phone: every control is on screen', async ({ page }) => {
  await signIn(page, 'lead');
  await page.goto('/f/kestrel-coast/members');
  await settle(page);
  const deactivate = page.getByRole('button', { name: /^Deactivate Demo Classifier$/ });
  await expect(deactivate).toBeVisible();
  const box = (await deactivate.boundingBox())!;
  expect(box.x).toBeGreaterThanOrEqual(0);
  expect(box.x + box.width).toBeLessThanOrEqual(390);
  const role = page.getByLabel('Role of Demo Classifier');
  const roleBox = (await role.boundingBox())!;
  expect(roleBox.x + roleBox.width).toBeLessThanOrEqual(390);
});
