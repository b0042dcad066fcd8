import { newPage, PHONE, screenshot, serveAndLaunch, WIDE, type Served, signIn } from '../helpers/browser';

jest.setTimeout(180_000);

let served: Served;
beforeAll(async () => {
  served = await serveAndLaunch();
});
afterAll(async () => {
  await served?.close();
});


describe.each([
  ['phone', PHONE],
  ['wide', WIDE],
])('the demo planner on a %s', (name, viewport) => {
  test('sees the open requests soonest due first, the most urgent first on the same day, and cannot file one', async () => {
    const page = await newPage(served, viewport);
    await signIn(page, 'planner@tinkerfin.example');
    await page.goto('/requests');
    await page.getByTestId('requests-table').waitFor();
    // Read from the rows themselves: other suites may file requests meanwhile, so the order is checked, not a fixed list.
    const rows = page.locator('[data-testid^="request-row-"]');
    const count = await rows.count();
    expect(count).toBeGreaterThan(1);
    const rank: Record<string, number> = { Urgent: 0, High: 1, Normal: 2, Low: 3 };
    const seen: { due: string; rank: number; id: string }[] = [];
    for (let i = 0; i < count; i++) {
      const text = await rows.nth(i).innerText();
      const due = /\d{4}-\d{2}-\d{2}/.exec(text)?.[0];
      const priority = /\b(Urgent|High|Normal|Low)\b/.exec(text)?.[1];
      expect(due).toBeDefined();
      expect(priority).toBeDefined();
      expect(text).toContain('Open');
      seen.push({ due: due!, rank: rank[priority!], id: (await rows.nth(i).getAttribute('data-testid'))!.replace('request-row-', '') });
    }
    for (let i = 1; i < seen.length; i++) {
      const [a, b] = [seen[i - 1], seen[i]];
      expect(a.due < b.due || (a.due === b.due && a.rank <= b.rank)).toBe(true);
    }
    expect(await page.getByTestId('request-new').count()).toBe(0);
    await screenshot(page, `requests-planner-${name}`);

    await page.getByTestId(`request-row-${seen[0].id}`).click();
    await page.getByTestId('request-lines-table').waitFor();
    expect(await page.getByTestId('request-edit').count()).toBe(0);
    await screenshot(page, `request-planner-detail-${name}`);
    await page.context().close();
  });
});
