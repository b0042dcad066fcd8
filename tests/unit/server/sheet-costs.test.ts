import { demoMachines, demoMaterials } from '@/shared/demo/profiles';
import { estimateLayout } from '@/shared/estimate';
import { costLines, estimateLines } from '@/server/services/sheet';

const [wren] = demoMachines;
const [nylon12] = demoMaterials;

describe("the build sheet's cost lines", () => {
  // Two request lines: six clips and one housing; each part's own volume as the layouts keep it.
  const placements = [
    ...[0, 1, 2, 3, 4, 5].map((i) => ({ id: 'line-clip', position: [10 + 30 * i, 10, 5], size: [24, 12, 8] })),
    { id: 'line-housing', position: [10, 40, 5], size: [80, 60, 45] },
  ];
  const e = estimateLayout({ layout: { placements }, machine: wren, material: nylon12, volumeById: { 'line-clip': 900, 'line-housing': 60_000 }, failureRate: 0.05 });
  const lines = costLines(e.cost, [
    { request_line_id: 'line-clip', part_name: 'Clip' },
    { request_line_id: 'line-housing', part_name: 'Housing' },
  ]);

  test("name every line's parts with the cost of one and of all, and a sum that is the build's total to the cent", () => {
    const money = (n: number) => n.toFixed(2);
    const clip = e.cost.perPart.find((p) => p.id === 'line-clip')!;
    const housing = e.cost.perPart.find((p) => p.id === 'line-housing')!;
    expect(lines).toContain(`6 x Clip: ${money(clip.each)} each, ${money(clip.total)} in all`);
    expect(lines).toContain(`1 x Housing: ${money(housing.each)} each, ${money(housing.total)} in all`);
    // The housing has 11 times a clip's volume and over 5 times its height: it costs more than one clip.
    expect(housing.each).toBeGreaterThan(clip.each);
    expect(lines[lines.length - 1]).toBe(`The parts add up to ${money(e.cost.totalCost)}, the build's total.`);
    expect(lines[0]).toContain(`total ${money(e.cost.totalCost)}`);
  });

  test('a one-chamber machine says it is held through the outside cooling', () => {
    expect(wren.chamberCount).toBe(1);
    expect(lines[0]).toMatch(/held through the outside cooling/);
  });

  test('an estimate stored without costs per part gives no lines rather than wrong ones', () => {
    expect(costLines(undefined, [])).toEqual([]);
  });
});

describe("the build sheet's estimate lines", () => {
  // A 40 mm cylinder standing in its box: its slices are pi/4 of the box's (circle in its square).
  const layout = { placements: [{ position: [10, 10, 5], size: [40, 40, 40] }], heightMm: 45 };
  const boxes = estimateLayout({ layout, machine: wren, material: nylon12 });
  const meshes = estimateLayout({ layout, machine: wren, material: nylon12, areaPerLayerMm2: boxes.areaPerLayerMm2.map((a) => (a * Math.PI) / 4) });
  const stored = (e: object) => JSON.parse(JSON.stringify(e));

  test('from the meshes, the scan line says what the print would read counted as boxes', () => {
    const lines = estimateLines(stored(meshes), wren);
    expect(lines[1]).toBe(`Print ${(meshes.print.printSeconds / 3600).toFixed(1)} h (preheat ${(meshes.print.preheatSeconds / 3600).toFixed(1)} h) · not calibrated yet`);
    expect(lines[4]).toBe(`Scan areas from the parts' sliced shapes; counted as boxes, the print would read ${(boxes.print.printSeconds / 3600).toFixed(1)} h`);
    expect(lines[2]).toContain(`to ${wren.removalTempC} °C`);
  });

  test('a box estimate says so, and an older estimate with nothing in it shows dashes', () => {
    expect(estimateLines(stored(boxes), wren)[4]).toBe("Box estimate: scan areas from the parts' bounding boxes, which read high");
    expect(estimateLines(undefined)[0]).toBe('- layers of - mm, parts up to - mm');
  });
});

