import type { Page } from 'playwright-core';
import { newPage, PHONE, screenshot, serveAndLaunch, WIDE, type Served, signIn } from '../helpers/browser';
import { gear, measureMesh, writeBinaryStl } from '../../shared/geometry';

jest.setTimeout(240_000);

let served: Served;
beforeAll(async () => {
  served = await serveAndLaunch();
});
afterAll(async () => {
  await served?.close();
});


/** A spur gear made by the project's own generator, written as binary STL. */
function gearStl() {
  const mesh = gear({ teeth: 18, rootRadiusMm: 14, tipRadiusMm: 17, boreRadiusMm: 4, thicknessMm: 6, samplesPerTooth: 6 });
  return { bytes: writeBinaryStl(mesh, 'browser test gear'), metrics: measureMesh(mesh) };
}

/**
 * Drops a file on an element the way a desktop drag does: a real DataTransfer
 * holding a File, in a drop event. The page code is a string so the test's own
 * transpiler does not rewrite it.
 */
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

test('a member without an uploading role reads the library without the drop zone', async () => {
  const page = await newPage(served, WIDE);
  await signIn(page, 'operator@tinkerfin.example');
  await page.goto('/parts');
  await page.getByTestId('parts-table').waitFor();
  expect(await page.getByTestId('parts-drop').count()).toBe(0);
  await page.getByText('Your roles in this lab let you read the library').waitFor();
  await page.context().close();
});

describe.each([
  ['phone', PHONE],
  ['wide', WIDE],
])('the demo designer on a %s', (name, viewport) => {
  test('drops an STL on the parts screen, sees it measured in the library and opens its page with the 3D preview', async () => {
    const page = await newPage(served, viewport);
    await signIn(page, 'designer@tinkerfin.example');
    await page.goto('/parts');
    await page.getByTestId('parts-table').waitFor();
    await page.locator('[data-testid^="part-row-"]').nth(1).scrollIntoViewIfNeeded();
    await screenshot(page, `parts-library-${name}`);

    const { bytes, metrics } = gearStl();
    const file = `drop-gear-${name}-${Date.now()}.stl`;
    // A broken file dropped with it is refused on its own line, naming the file; the good one is still kept.
    const broken = `broken-${name}-${Date.now()}.stl`;
    await dropFiles(page, 'parts-drop', [
      { name: file, bytes },
      { name: broken, bytes: bytes.subarray(0, 84 + 50 * 3 + 17) },
    ]);
    await page.getByTestId(`upload-status-${file}`).getByText('Measured').waitFor();
    await page.getByTestId(`upload-status-${broken}`).getByText('Refused').waitFor();
    expect(await page.getByTestId(`upload-error-${broken}`).first().innerText()).toContain(broken);
    const expectedSize = metrics.sizeMm.map(oneDecimal).join(' × ');
    await screenshot(page, `parts-uploaded-${name}`);

    // The library, searched by the new part's name, lists it with the size the server measured.
    const partName = file.replace(/\.stl$/, '');
    await page.getByTestId('parts-search').fill(partName);
    await page.getByTestId('parts-total').getByText('1 part', { exact: true }).waitFor();
    const row = page.locator('[data-testid^="part-row-"]').filter({ hasText: partName });
    await row.waitFor();
    expect(await row.innerText()).toContain(expectedSize);
    await row.scrollIntoViewIfNeeded();
    // Its row carries the picture the server drew from the uploaded mesh.
    await page.waitForFunction(
      "(() => { const img = document.querySelector('[data-testid^=\"part-row-\"] [data-testid^=\"part-thumb-\"] img'); return !!img && img.complete && img.naturalWidth === 128; })()",
      undefined,
      { timeout: 20_000 },
    );
    await screenshot(page, `parts-search-${name}`);

    await row.click();
    await page.getByTestId('screen-part').waitFor();
    try {
      await page.getByTestId('part-preview').locator('canvas').waitFor();
    } catch (e) {
      // Keep what the page showed instead of the preview, to tell a stuck load from an error.
      await screenshot(page, `parts-preview-missing-${name}`);
      throw new Error(`no 3D preview; the page said: ${(await page.getByTestId('screen-part').innerText()).slice(0, 600)}\n${(e as Error).message}`);
    }
    expect(await page.getByTestId('part-metric-triangles').innerText()).toBe(metrics.triangles.toLocaleString('en-US'));
    expect(await page.getByTestId('part-metric-watertight').innerText()).toBe('yes');
    // Give the software renderer a moment to draw the first frame before the picture is taken.
    await page.waitForTimeout(1500);
    await screenshot(page, `part-page-${name}`);

    // A quarter turn about x swaps the part's y and z extents, shown before it is saved and measured so after.
    await page.getByTestId('part-rotate-x').click();
    const turned = [metrics.sizeMm[0], metrics.sizeMm[2], metrics.sizeMm[1]].map((v) => String(Number(v.toFixed(2)))).join(' × ');
    expect(await page.getByTestId('part-rotated-size').innerText()).toContain(turned);
    await page.getByTestId('part-rotate-x').scrollIntoViewIfNeeded();
    await page.waitForTimeout(500);
    await screenshot(page, `part-edit-${name}`);
    await page.getByTestId('part-edit-save').click();
    await page.getByTestId('part-edit-saved').waitFor();
    expect(await page.getByTestId('part-metric-size').innerText()).toContain(turned);
    await page.context().close();
  });

  test('opens one part of a 3MF that holds several and sees its own 3D preview', async () => {
    const page = await newPage(served, viewport);
    await signIn(page, 'designer@tinkerfin.example');
    await page.goto('/parts');
    await page.getByTestId('parts-search').fill('Arm hinge leaf');
    const row = page.locator('[data-testid^="part-row-"]').filter({ hasText: 'Arm hinge leaf' });
    await row.first().click();
    await page.getByTestId('screen-part').waitFor();
    await page.getByTestId('part-preview').locator('canvas').waitFor();
    expect(await page.getByTestId('part-preview-error').count()).toBe(0);
    await page.waitForTimeout(1000);
    await screenshot(page, `part-page-3mf-${name}`);
    await page.context().close();
  });

  test('files a request for a library part, with an out-of-range quantity and a past due date refused inline first, then changes it while nothing is planned', async () => {
    const page = await newPage(served, viewport);
    await signIn(page, 'designer@tinkerfin.example');
    await page.goto('/requests');
    await page.getByTestId('request-new').click();
    await page.getByTestId('request-form').waitFor();
    const title = `Browser request ${name} ${Date.now()}`;
    await page.getByTestId('request-title').fill(title);
    await page.getByTestId('request-material').getByRole('radio').first().click();
    await page.getByTestId('request-part-search').fill('gear');
    const add = page.locator('[data-testid^="request-add-part-"]').first();
    await add.waitFor();
    await add.click();
    await page.getByTestId('request-line-0').waitFor();
    await page.getByTestId('request-line-0-quantity').fill('0');
    await page.getByTestId('request-due').fill('2020-03-02');
    await page.getByTestId('request-submit').click();
    await page.getByTestId('request-line-0-error').waitFor();
    expect(await page.getByTestId('request-due-error').innerText()).toMatch(/past/);
    await screenshot(page, `request-new-${name}`);

    const due = new Date(Date.now() + 21 * 86_400_000).toISOString().slice(0, 10);
    await page.getByTestId('request-due').fill(due);
    await page.getByTestId('request-line-0-quantity').fill('12');
    await page.getByTestId('request-priority-high').click();
    await page.getByTestId('request-submit').click();
    await page.getByTestId('screen-request').waitFor();
    expect(await page.getByTestId('request-total-quantity').innerText()).toBe('12');
    expect(await page.getByTestId('request-due-date').innerText()).toContain(due);
    await page.getByText(title).first().waitFor();
    await screenshot(page, `request-detail-${name}`);

    // Nothing is planned yet, so the designer may still change it.
    await page.getByTestId('request-edit').click();
    await page.getByTestId('request-line-0-quantity').fill('20');
    await page.getByTestId('request-submit').click();
    await page.getByTestId('request-total-quantity').getByText('20', { exact: true }).waitFor();

    await page.getByTestId('request-back').click();
    await page.getByTestId('requests-table').getByText(title).waitFor();
    await screenshot(page, `requests-list-${name}`);
    await page.context().close();
  });
});

test('on a wide screen, a click on a column header sorts the library by it, largest volume first', async () => {
  const page = await newPage(served, WIDE);
  await signIn(page, 'designer@tinkerfin.example');
  await page.goto('/parts');
  await page.getByTestId('parts-table-head').waitFor();
  await page.getByTestId('parts-sort-volume').click();
  await page.getByTestId('parts-sort-volume').getByText('↓').waitFor();
  const lab = ((await page.evaluate("fetch('/api/me').then((r) => r.json())")) as { labs: { id: string }[] }).labs[0].id;
  const largest = (await page.evaluate(`fetch('/api/labs/${lab}/parts?sort=-volume&pageSize=1').then((r) => r.json())`)) as { items: { id: string }[] };
  await page.locator('[data-testid^="part-row-"]').first().and(page.getByTestId(`part-row-${largest.items[0].id}`)).waitFor();
  await page.getByTestId('parts-filters-toggle').click();
  await page.getByTestId('parts-filters').waitFor();
  await screenshot(page, 'parts-sorted-filters-wide');
  await page.context().close();
});

test('on a 1,024 px window, where the side rail leaves the page 680 px, the library lists cards rather than a cramped table, and the requests too (on a tablet too; a table on a wide screen)', async () => {
  const page = await newPage(served, { width: 1024, height: 768 });
  await signIn(page, 'designer@tinkerfin.example');
  await page.goto('/parts');
  await page.getByTestId('parts-table').waitFor();
  await page.locator('[data-testid^="part-row-"]').first().waitFor();
  // The rail is there (the wide layout), the table's header row is not: each part is a card with its labels.
  await page.getByTestId('nav-rail').waitFor();
  expect(await page.getByTestId('parts-table-head').count()).toBe(0);
  await screenshot(page, 'parts-cards-1024');
  await page.goto('/requests');
  await page.getByTestId('requests-table').waitFor();
  expect(await page.getByTestId('requests-table-head').count()).toBe(0);
  await screenshot(page, 'requests-cards-1024');
  // A tablet (820 px, no rail) leaves the page 788 px: less than the requests table's fixed columns and a readable
  // request and material column need, so cards there too (the table squeezed those two columns to a letter).
  await page.setViewportSize({ width: 820, height: 1180 });
  await page.locator('[data-testid^="request-row-"]').first().waitFor();
  expect(await page.getByTestId('requests-table-head').count()).toBe(0);
  await screenshot(page, 'requests-cards-820');
  // On a wide screen the table stands.
  await page.setViewportSize({ width: 1440, height: 900 });
  await page.getByTestId('requests-table-head').waitFor();
  await page.context().close();
});

test('a designer deleting a part that a request names is told why it stays', async () => {
  const page = await newPage(served, WIDE);
  await signIn(page, 'designer@tinkerfin.example');
  const lab = ((await page.evaluate("fetch('/api/me').then((r) => r.json())")) as { labs: { id: string }[] }).labs[0].id;
  const requests = (await page.evaluate(`fetch('/api/labs/${lab}/requests?status=open&pageSize=100').then((r) => r.json())`)) as { items: { title: string; lines: { partId: string }[] }[] };
  // A seeded request: its parts are the designer's own uploads (other tests file requests too).
  const partId = requests.items.find((r) => r.title === 'Sensor rig housings')!.lines[0].partId;
  await page.goto(`/parts/${partId}`);
  await page.getByTestId('part-delete').click();
  await page.getByTestId('part-delete-confirm').click();
  await page.getByTestId('part-delete-error').waitFor();
  expect(await page.getByTestId('part-delete-error').innerText()).toMatch(/request/i);
  await page.getByTestId('part-delete-error').scrollIntoViewIfNeeded();
  await screenshot(page, 'part-delete-in-use-wide');
  await page.context().close();
});
