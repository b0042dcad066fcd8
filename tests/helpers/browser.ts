import { chromium, type Browser, type Page } from 'playwright-core';
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { createServer, type Server } from 'node:http';
import type { Running } from '../../server/boot';
import type { Config } from '../../server/config';
import { startTestApp } from './app';
import { DEMO_PASSWORD } from '../../server/db/seeders/demo';
import request from 'supertest';
import { makeRequest, type FixturePart } from './plans';

export const CHROMIUM = '/usr/bin/chromium';
export const ARTIFACTS = join(__dirname, '..', '..', 'test-artifacts');
export const PHONE = { width: 390, height: 844 };
export const WIDE = { width: 1440, height: 900 };

export type Served = { running: Running; server: Server; baseUrl: string; browser: Browser; close(): Promise<void> };

/**
 * The real server (exported web app + API on the test database) on a free
 * loopback port, and Debian's Chromium driven by playwright-core. A test may
 * change the server's settings (a short upload wait, no worker of its own).
 */
export async function serveAndLaunch(overrides: Partial<Config> = {}): Promise<Served> {
  // APP_URL must be the address the browser uses, for the Origin check and invite links, so the port is taken
  // first and held while the app starts (a port let go and listened on again was once taken meanwhile by another
  // connection, and every test of the file failed); the app answers on it once it is ready.
  const server = createServer();
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => resolve());
  });
  const port = (server.address() as { port: number }).port;
  const baseUrl = `http://127.0.0.1:${port}`;
  let running: Running | null = null;
  let browser: Browser;
  try {
    running = await startTestApp({ appUrl: baseUrl, webDist: 'dist', ...overrides });
    server.on('request', running.app);
    browser = await chromium.launch({
      executablePath: CHROMIUM,
      // SwiftShader gives headless Chromium software WebGL for the 3D views.
      args: ['--headless', '--no-sandbox', '--disable-gpu', '--use-angle=swiftshader', '--enable-unsafe-swiftshader', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'],
    });
  } catch (err) {
    // Nothing is left open when the set-up fails (an app left running keeps jest from exiting after the run).
    server.close();
    await running?.close();
    throw err;
  }
  const app = running;
  return {
    running: app,
    server,
    baseUrl,
    browser,
    async close() {
      await browser.close();
      server.closeAllConnections();
      await new Promise<void>((r) => server.close(() => r()));
      await app.close();
    },
  };
}

/**
 * A fresh page. The tests hand page.evaluate and waitForFunction their code
 * as strings, which the app's Content-Security-Policy (no eval) would block,
 * so pages bypass it unless a test checks the policy itself (`enforceCsp`).
 */
export async function newPage(served: Served, viewport: { width: number; height: number }, opts: { enforceCsp?: boolean; touch?: boolean } = {}): Promise<Page> {
  const context = await served.browser.newContext({ viewport, baseURL: served.baseUrl, bypassCSP: !opts.enforceCsp, hasTouch: !!opts.touch });
  const page = await context.newPage();
  page.setDefaultTimeout(20_000);
  return page;
}

export async function screenshot(page: Page, name: string) {
  mkdirSync(ARTIFACTS, { recursive: true });
  await page.screenshot({ path: join(ARTIFACTS, `${name}.png`), fullPage: false });
}

/**
 * The same screen at the other size: resizes the page, waits until the lab's
 * navigation has switched (the rail when wide, the tab bar on a phone) and
 * takes the screenshot, without replaying the flow that led there.
 */
export async function screenshotAt(page: Page, viewport: { width: number; height: number }, name: string) {
  await page.setViewportSize(viewport);
  await page.getByTestId(viewport.width >= WIDE.width ? 'nav-rail' : 'nav-tabs').waitFor();
  await screenshot(page, name);
}

/** Signs in through the sign-in screen and waits for home (demo members share one password). */
export async function signIn(page: Page, email: string, password = DEMO_PASSWORD) {
  await page.goto('/');
  await page.getByTestId('sign-in-email').fill(email);
  await page.getByTestId('sign-in-password').fill(password);
  await page.getByTestId('sign-in-submit').click();
  await page.getByTestId('screen-home').waitFor();
}

/**
 * Opens a section from the lab's navigation: the side rail on a wide screen,
 * the tab bar on a phone, where sections beyond the bar's room sit under "More".
 */
export async function openSection(page: Page, key: string) {
  const rail = page.getByTestId('nav-rail');
  if (await rail.isVisible()) return rail.getByTestId(`nav-${key}`).click();
  const tabs = page.getByTestId('nav-tabs');
  await tabs.waitFor();
  if ((await tabs.getByTestId(`nav-${key}`).count()) === 0) await tabs.getByTestId('nav-more').click();
  await tabs.getByTestId(`nav-${key}`).click();
}

/**
 * An urgent open request of a test's own in the demo lab (written straight into the tables by makeRequest),
 * so a new plan has these parts to take whatever other browser tests sharing the database have planned
 * already: the new plan form starts with the most urgent lines.
 */
export async function urgentDemoRequest(served: Served, parts: FixturePart[], title: string) {
  const owner = request.agent(served.running.app);
  owner.set('Origin', served.baseUrl);
  const signedIn = await owner.post('/api/auth/sign-in').send({ email: 'owner@tinkerfin.example', password: DEMO_PASSWORD });
  if (signedIn.status !== 200) throw new Error(`sign-in failed: ${signedIn.status}`);
  const me = (await owner.get('/api/me')).body;
  const labId = me.labs[0].id as string;
  const material = (await owner.get(`/api/labs/${labId}/materials`)).body[0];
  return makeRequest(served.running, labId, me.user.id, material.id, parts, { title, dueDate: '2026-12-03', priority: 'urgent' });
}

/** Looks down on the parts and clicks (or taps) points of the view until one marks a part. */
export async function markAPart(page: Page, tap: boolean) {
  // (tap: a touch; the phone runs here with a mouse, which the view treats alike)
  await page.getByTestId('view-top').click();
  await page.evaluate('new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r)))');
  const canvas = page.locator('[data-testid="plan-build"] canvas');
  const box = (await canvas.boundingBox())!;
  // A packed plate may leave its middle empty: points over the view under its button bar, a grid of 9 x 8.
  const points: [number, number][] = [];
  for (let i = 0; i < 8; i++) for (let j = 1; j <= 9; j++) points.push([j / 10, 0.25 + i / 10]);
  for (const [fx, fy] of points) {
    const x = box.x + box.width * fx;
    const y = box.y + box.height * fy;
    if (tap) await page.touchscreen.tap(x, y);
    else await page.mouse.click(x, y);
    // A part under the point marks it: the bar naming the marked parts appears.
    const marked = await page
      .getByTestId('plan-marked')
      .waitFor({ timeout: 500 })
      .then(() => true)
      .catch(() => false);
    if (marked) return;
  }
  throw new Error('no part under any of the points tried');
}

/** Moves the marked part step by step one way until it comes within the spacing of another (or the steps run out). */
export async function moveUntilFault(page: Page, step: () => Promise<void>, steps = 40) {
  for (let i = 0; i < steps && (await page.getByTestId('plan-edit-faults').count()) === 0; i++) {
    await step();
    // The screen has drawn the moved layout (and its check) before it is read again.
    await page.evaluate('new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r)))');
  }
}

/** With the buttons under the view: the marked part moved left, right, back and front until it clashes with another. */
export async function moveIntoClash(page: Page) {
  await moveUntilFault(page, () => page.getByTestId('plan-move-left').click());
  await moveUntilFault(page, () => page.getByTestId('plan-move-right').click(), 80);
  await moveUntilFault(page, () => page.getByTestId('plan-move-back').click());
  await moveUntilFault(page, () => page.getByTestId('plan-move-front').click(), 80);
  await page.getByTestId('plan-edit-faults').waitFor();
}

export type Xy = { x: number; y: number };
/** A placement's box as the chamber view draws it (low corner, size). */
export type Box = { position: [number, number, number]; size: [number, number, number] };
/**
 * Asks the chamber view's probe (see ChamberView.web.tsx): where chamber points land on the page, what is under a
 * page point, a placement's box. A script in a string: the test's own code is compiled with helpers the page does
 * not have. The canvas is in the page a moment before the scene inside it has set its probe up: it is waited for.
 */
export async function probe<T>(page: Page, fn: string, ...args: unknown[]): Promise<T> {
  await page.waitForFunction('!!window.__chamberProbe', undefined, { timeout: 10_000 }).catch(() => {});
  return (await page.evaluate(
    `(() => { const p = window.__chamberProbe; if (!p) throw new Error('the chamber view has no probe'); const v = p[${JSON.stringify(fn)}]; return typeof v === 'function' ? v.apply(p, ${JSON.stringify(args)}) : v; })()`,
  )) as T;
}
export const boxOf = (page: Page, i: number) => probe<Box | null>(page, 'boxOf', i);

