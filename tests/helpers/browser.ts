import { chromium, type Browser, type Page } from 'playwright-core';
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import type { Server } from 'node:http';
import { listen, type Running } from '../../server/boot';
import type { Config } from '../../server/config';
import { startTestApp } from './app';
import { DEMO_PASSWORD } from '../../server/db/seeders/demo';

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
  const probe = await startTestApp();
  // APP_URL must be the address the browser uses, for the Origin check and invite links.
  const server0 = await listen(probe.app, 0, '127.0.0.1');
  const port = (server0.address() as { port: number }).port;
  await new Promise<void>((r) => server0.close(() => r()));
  await probe.close();
  const baseUrl = `http://127.0.0.1:${port}`;
  const running = await startTestApp({ appUrl: baseUrl, webDist: 'dist', ...overrides });
  const server = await listen(running.app, port, '127.0.0.1');
  const browser = await chromium.launch({
    executablePath: CHROMIUM,
    // SwiftShader gives headless Chromium software WebGL for the 3D views.
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--use-angle=swiftshader', '--enable-unsafe-swiftshader', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'],
  });
  return {
    running,
    server,
    baseUrl,
    browser,
    async close() {
      await browser.close();
      server.closeAllConnections();
      await new Promise<void>((r) => server.close(() => r()));
      await running.close();
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
