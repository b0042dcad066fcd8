/**
 * The exported web app under the server's Content-Security-Policy: signing
 * in, the part library with a 3D preview (a mesh worker and WebGL) and a
 * plan's 3D build view must render with no violation reported.
 */
import { newPage, serveAndLaunch, screenshot, signIn, WIDE, type Served } from '../helpers/browser';

jest.setTimeout(180_000);

let served: Served;
beforeAll(async () => {
  served = await serveAndLaunch();
});
afterAll(async () => {
  await served?.close();
});

test('the app renders with no Content-Security-Policy violation on sign-in, parts, a 3D preview and a plan', async () => {
  const page = await newPage(served, WIDE, { enforceCsp: true });
  const console: string[] = [];
  page.on('console', (m) => {
    if (/Content.Security.Policy/i.test(m.text())) console.push(m.text());
  });
  // Reported by the browser for every blocked load, eval or inline script (W3C CSP Level 3, §5.3).
  await page.addInitScript(
    "window.__cspViolations = []; document.addEventListener('securitypolicyviolation', function (e) { window.__cspViolations.push(e.violatedDirective + ' ' + e.blockedURI); });",
  );
  const first = await page.goto('/');
  const policy = first!.headers()['content-security-policy'];
  expect(policy).toContain("default-src 'self'");
  expect(policy).toContain("script-src 'self'");
  expect(policy).not.toContain("'unsafe-eval'");
  expect(policy).toContain("frame-ancestors 'none'");

  await signIn(page, 'owner@tinkerfin.example');
  await page.goto('/parts');
  await page.getByTestId('parts-search').fill('Arm hinge leaf');
  await page.locator('[data-testid^="part-row-"]').filter({ hasText: 'Arm hinge leaf' }).first().click();
  await page.getByTestId('screen-part').waitFor();
  await page.getByTestId('part-preview').locator('canvas').waitFor();
  expect(await page.getByTestId('part-preview-error').count()).toBe(0);

  expect(await page.evaluate('window.__cspViolations')).toEqual([]);

  // The demo plan the planner packed and sent for review.
  const [[plan]] = (await served.running.db.sequelize.query(
    `SELECT p.id FROM plans p JOIN labs l ON l.id = p.lab_id WHERE l.name LIKE 'Tinkerfin%' ORDER BY p.created_at LIMIT 1`,
  )) as [{ id: string }[], unknown];
  await page.goto(`/plans/${plan.id}`);
  await page.locator('canvas').first().waitFor();
  await page.waitForTimeout(500);
  await screenshot(page, 'csp-plan-wide');

  const reported = (await page.evaluate('window.__cspViolations')) as string[];
  expect({ reported, console }).toEqual({ reported: [], console: [] });
  await page.context().close();
});
