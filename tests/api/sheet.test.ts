import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { inflateSync } from 'node:zlib';
import { startTestApp } from '../helpers/app';
import { labWithProfiles } from '../helpers/plans';
import type { Running } from '../../server/boot';
import { labWithCrew, queuedPlan } from './runs-fixtures';

jest.setTimeout(30_000);

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

const binary = (res: any, cb: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => cb(null, Buffer.concat(chunks)));
};

/**
 * The text a PDF's pages show: each content stream inflated (FlateDecode, ISO 32000-1 section 7.4.4) and the hex
 * strings of its text-showing operators (section 9.4.3) decoded, one line per operator.
 */
function pdfText(pdf: Buffer): string {
  const raw = pdf.toString('latin1');
  const lines: string[] = [];
  for (const m of raw.matchAll(/stream\r?\n/g)) {
    const start = m.index! + m[0].length;
    const end = raw.indexOf('endstream', start);
    let body: string;
    try {
      body = inflateSync(pdf.subarray(start, end)).toString('latin1');
    } catch {
      continue;
    }
    for (const op of body.matchAll(/\[([^\]]*)\]\s*TJ/g)) lines.push([...op[1].matchAll(/<([0-9a-fA-F]*)>/g)].map((h) => Buffer.from(h[1], 'hex').toString('latin1')).join(''));
  }
  return lines.join('\n');
}

const GEAR = { name: 'Gear', sizeMm: [30, 30, 8] as [number, number, number], quantity: 40 };

describe('the build sheet', () => {
  test('an approved plan\'s sheet is a PDF titled with the plan\'s name', async () => {
    const lab = await labWithCrew(running, 'sheet');
    const plan = await queuedPlan(running, lab, [GEAR], { name: 'Gear batch 7' });
    const res = await lab.operator.agent.get(`${plan.base}/sheet.pdf`).buffer(true).parse(binary);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toContain('application/pdf');
    expect(res.headers['content-disposition']).toContain('Gear batch 7 build sheet.pdf');
    const pdf: Buffer = res.body;
    // ISO 32000-1 §7.5: a PDF file starts with the %PDF- header and ends with the %%EOF marker.
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect(pdf.toString('latin1').trimEnd().endsWith('%%EOF')).toBe(true);
    // The document information's /Title (ISO 32000-1 §14.3.3), written as a reference to a string object.
    const text = pdf.toString('latin1');
    const ref = /\/Title (\d+) 0 R/.exec(text);
    expect(ref).not.toBeNull();
    expect(text).toContain(`${ref![1]} 0 obj\n(Build sheet: Gear batch 7)`);
    expect(pdf.length).toBeGreaterThan(2000);
    // Kept for a look by eye: the sheet is for the operator's clipboard.
    const dir = join(__dirname, '..', '..', 'test-artifacts', 'sheet');
    mkdirSync(dir, { recursive: true });
    writeFileSync(join(dir, 'build-sheet.pdf'), pdf);
  });

  test('a plan still in review has no sheet yet (409), and another lab\'s plan is not found', async () => {
    const lab = await labWithCrew(running, 'sheetdraft');
    const plan = await queuedPlan(running, lab, [GEAR], { approve: false });
    const res = await lab.agent.get(`${plan.base}/sheet.pdf`);
    expect(res.status).toBe(409);
    expect(res.body.error).toMatchObject({ code: 'not_approved', status: 'in_review' });
    const other = await labWithProfiles(running, 'sheetother');
    expect((await other.agent.get(`/api/labs/${other.labId}/plans/${plan.planId}/sheet.pdf`)).status).toBe(404);
  });
});

describe('the build sheet\'s views', () => {
  test('draw the parts\' own shapes when their files are read, and bounding boxes, saying why, when one is not', async () => {
    const lab = await labWithCrew(running, 'sheetshapes');
    const plan = await queuedPlan(running, lab, [GEAR], { name: 'Gear batch 8' });
    const get = async () => {
      const res = await lab.operator.agent.get(`${plan.base}/sheet.pdf`).buffer(true).parse(binary);
      expect(res.status).toBe(200);
      return pdfText(res.body);
    };
    const shapes = await get();
    expect(shapes).toContain('Top view (x, y), from above');
    expect(shapes).toContain("The views draw the parts' own shapes, shaded by depth");
    // The top view draws the whole plate; the side view of this one layer of 8 mm gears (on the 5 mm floor) draws
    // the chamber up to 20 mm, so they are not a strip along the bottom of its full height.
    const captions = [...shapes.matchAll(/^(\d+) x (\d+) mm(.*)$/gm)];
    expect(captions).toHaveLength(2);
    expect(captions[0][3]).toBe('');
    expect(captions[1][2]).toBe('20');
    expect(captions[1][3]).toMatch(/^, the lowest 20 mm of the chamber's \d+ mm$/);
    // The part's stored file spoilt: the sheet is still made, with boxes, and says which part and why.
    await running.db.sequelize.query(
      `UPDATE files SET data = convert_to('not a mesh', 'UTF8'), size_bytes = 10 WHERE key IN (SELECT p.file_key FROM parts p JOIN request_lines rl ON rl.part_id = p.id WHERE rl.id = $1)`,
      { bind: [plan.request.lines[0].id] },
    );
    const boxes = await get();
    expect(boxes).toContain('The stored file of "Gear" (Gear.stl) cannot be read as a mesh, so the views draw bounding boxes.');
    expect(boxes).not.toContain("the parts' own shapes");
  });
});
