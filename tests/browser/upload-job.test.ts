/**
 * An upload the server does not finish within its wait answers 202 with a
 * job, and the upload screen follows that job: the file shows as queued
 * while no worker has taken it, then, once a worker joins the queue, as
 * measured with its part and the size the worker measured. The server here
 * waits not at all (UPLOAD_WAIT_MS 0) and has no worker of its own; each test
 * starts one when it has seen the queued state.
 */
import type { Page } from 'playwright-core';
import type { Running } from '../../server/boot';
import { newPage, PHONE, screenshot, serveAndLaunch, WIDE, type Served, signIn } from '../helpers/browser';
import { startTestApp } from '../helpers/app';
import { measureMesh, prism, writeBinaryStl } from '../../shared/geometry';

jest.setTimeout(240_000);

let served: Served;
let worker: Running | null = null;
beforeAll(async () => {
  served = await serveAndLaunch({ uploadWaitMs: 0, meshWorker: false });
});
afterAll(async () => {
  await worker?.close();
  await served?.close();
});

/** Drops files on the drop zone as a desktop drag does (a DataTransfer holding Files); the page code is a string so the test's transpiler leaves it alone. */
async function dropFiles(page: Page, testId: string, files: { name: string; bytes: Uint8Array }[]) {
  const encoded = files.map((f) => ({ name: f.name, b64: Buffer.from(f.bytes).toString('base64') }));
  const dataTransfer = await page.evaluateHandle(`(() => {
    const dt = new DataTransfer();
    for (const f of ${JSON.stringify(encoded)}) {
      const raw = atob(f.b64);
      const u8 = new Uint8Array(raw.length);
      for (let i = 0; i < raw.length; i++) u8[i] = raw.charCodeAt(i);
      dt.items.add(new File([u8], f.name, { type: 'model/stl' }));
    }
    return dt;
  })()`);
  const zone = page.getByTestId(testId);
  await zone.dispatchEvent('dragenter', { dataTransfer });
  await zone.dispatchEvent('dragover', { dataTransfer });
  await zone.dispatchEvent('drop', { dataTransfer });
}

const oneDecimal = (v: number) => String(Number(v.toFixed(1)));

describe.each([
  ['phone', PHONE],
  ['wide', WIDE],
])('the demo designer on a %s', (name, viewport) => {
  afterEach(async () => {
    await worker?.close();
    worker = null;
  });

  test('an upload answered with a job is followed on the upload screen from queued to measured, showing its part', async () => {
    const page = await newPage(served, viewport);
    await signIn(page, 'designer@tinkerfin.example');
    await page.goto('/parts');
    await page.getByTestId('parts-table').waitFor();

    const mesh = prism([[0, 0], [32, 0], [32, 18], [0, 18]], 0, 7 + (name === 'phone' ? 0 : 1));
    const file = `queued-block-${name}-${Date.now()}.stl`;
    const answered = page.waitForResponse((r) => r.request().method() === 'POST' && /\/api\/labs\/[^/]+\/parts$/.test(r.url()));
    await dropFiles(page, 'parts-drop', [{ name: file, bytes: writeBinaryStl(mesh, file) }]);
    const res = await answered;
    expect(res.status()).toBe(202);
    const job = ((await res.json()) as { job: { id: string; state: string } }).job;
    expect(job.state).toBe('queued');

    // No worker yet: the screen says the file is queued and keeps asking about its job.
    await page.getByTestId(`upload-status-${file}`).getByText('Queued for measuring…').waitFor();
    expect(await page.getByTestId(`upload-job-${file}`).innerText()).toContain('queued this file');
    await page.getByTestId(`upload-item-${file}`).scrollIntoViewIfNeeded();
    await screenshot(page, `upload-job-queued-${name}`);

    // A worker joins the server's queue; the screen follows the job to its end and lists the measured part.
    worker = await startTestApp({ jobQueue: served.running.config.jobQueue, meshWorker: true, meshThreads: 1 });
    await page.getByTestId(`upload-status-${file}`).getByText('Measured').waitFor({ timeout: 120_000 });
    const part = page.getByTestId(`upload-item-${file}`).locator('[data-testid^="upload-part-"]');
    await part.waitFor();
    const size = measureMesh(mesh).sizeMm.map(oneDecimal).join(' × ');
    expect(await part.innerText()).toContain(file.replace(/\.stl$/, ''));
    expect(await part.innerText()).toContain(size);
    await page.getByTestId(`upload-item-${file}`).scrollIntoViewIfNeeded();
    await screenshot(page, `upload-job-measured-${name}`);

    // The job route the screen followed says the same.
    const view = await page.evaluate(`fetch('/api/labs/' + ${JSON.stringify(res.url().split('/labs/')[1].split('/')[0])} + '/jobs/${job.id}').then((r) => r.json())`);
    expect((view as { job: { state: string }; parts: { name: string }[] }).job.state).toBe('done');
    await page.context().close();
  });
});
