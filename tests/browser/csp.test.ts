/**
 * The exported web app under the server's own Content-Security-Policy
 * (enforced here, not bypassed as the other browser tests do): signing in,
 * the part library with a 3D preview (a mesh worker and WebGL), a plan's 3D
 * build view and the settings screens must render with no violation
 * reported. The browser reports every blocked load, eval, WebAssembly
 * compilation or inline script as a `securitypolicyviolation` event
 * (W3C Content Security Policy Level 3, §5.3) and a console message; the
 * test collects both without evaluating any script string in the page,
 * which the policy would itself refuse.
 */
import { newPage, serveAndLaunch, screenshot, signIn, WIDE, type Served } from '../helpers/browser';
import request from 'supertest';
import { PASSWORD, uniqueEmail } from '../helpers/app';
import { GEAR } from '../helpers/plans';
import { demoMachines, demoMaterials } from '../../shared/demo/profiles';
import { queuedPlan } from '../api/runs-fixtures';

jest.setTimeout(240_000);

let served: Served;
beforeAll(async () => {
  served = await serveAndLaunch();
});
afterAll(async () => {
  await served?.close();
});

/** Signs up a new user with a new lab through the served app's API (its own Origin). */
async function signUpServed(tag: string) {
  const a = request.agent(served.running.app);
  a.set('Origin', served.baseUrl);
  const email = uniqueEmail(tag);
  const res = await a.post('/api/auth/sign-up').send({ email, password: PASSWORD, name: `Test ${tag}`, labName: `Lab of ${tag}` });
  if (res.status !== 201) throw new Error(`sign-up failed: ${res.status} ${JSON.stringify(res.body)}`);
  return { agent: a, email, userId: res.body.user.id as string, labId: res.body.labs[0].id as string };
}

test('the app works with no Content-Security-Policy violation: sign-in, parts and a 3D preview, a plan, settings', async () => {
  const page = await newPage(served, WIDE, { enforceCsp: true });
  const reported: string[] = [];
  const console: string[] = [];
  page.on('console', (m) => {
    if (/Content.Security.Policy/i.test(m.text())) console.push(m.text());
  });
  // A binding, not page.evaluate: the page calls back into the test.
  await page.exposeFunction('__cspViolation', (v: string) => reported.push(v));
  await page.addInitScript(
    "document.addEventListener('securitypolicyviolation', function (e) { window.__cspViolation([e.effectiveDirective, e.blockedURI, e.sourceFile + ':' + e.lineNumber + ':' + e.columnNumber, e.sample].join(' ')); });",
  );

  const first = await page.goto('/');
  const policy = first!.headers()['content-security-policy'];
  expect(policy).toContain("default-src 'self'");
  expect(policy).toMatch(/script-src 'self'/);
  expect(policy).not.toContain("'unsafe-eval'");
  expect(policy).not.toMatch(/script-src[^;]*'unsafe-inline'/);
  expect(policy).toContain("frame-ancestors 'none'");

  // A lab of the test's own with a plan in review (its parts carry real meshes).
  const owner = await signUpServed('csp');
  const machine = { ...demoMachines[1], name: 'Policy machine' };
  const material = { ...demoMaterials[0], name: 'Policy powder' };
  const m = await owner.agent.post(`/api/labs/${owner.labId}/machines`).send(machine);
  const mt = await owner.agent.post(`/api/labs/${owner.labId}/materials`).send(material);
  const lab = { ...owner, machineId: m.body.id as string, materialId: mt.body.id as string, machine, material };
  const plan = await queuedPlan(served.running, lab, [GEAR], { name: 'Policy plan', approve: false });

  await signIn(page, lab.email, PASSWORD);
  await page.goto('/parts');
  await page.getByTestId('parts-search').fill(GEAR.name);
  await page.locator('[data-testid^="part-row-"]').filter({ hasText: GEAR.name }).first().click();
  await page.getByTestId('screen-part').waitFor();
  await page.getByTestId('part-preview').locator('canvas').waitFor();
  expect(await page.getByTestId('part-preview-error').count()).toBe(0);

  // The plan in its 3D build view.
  await page.goto(`/plans/${plan.planId}`);
  await page.locator('canvas').first().waitFor();
  await page.waitForTimeout(1000);
  await screenshot(page, 'csp-plan-wide');

  await page.goto('/settings/audit');
  await page.getByTestId('screen-audit').waitFor();
  await page.getByTestId('audit-list').waitFor();

  expect({ reported, console }).toEqual({ reported: [], console: [] });
  await page.context().close();
});
