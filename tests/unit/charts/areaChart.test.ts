import { areaChartModel, binMax, readoutAt } from '../../../components/charts/areaChartModel';
import { niceStep, ticksTo } from '../../../components/charts/scale';

describe('chart axes', () => {
  test('steps are 1, 2 or 5 times a power of ten and the ticks reach past the largest value', () => {
    expect(niceStep(100, 4)).toBe(50);
    expect(niceStep(7, 4)).toBe(2);
    expect(niceStep(0.3, 3)).toBe(0.1);
    expect(ticksTo(123, 3)).toEqual([0, 50, 100, 150]);
    expect(ticksTo(0.25, 3)).toEqual([0, 0.1, 0.2, 0.3]);
    expect(ticksTo(100, 4)).toEqual([0, 50, 100]);
  });
});

describe('the area-per-layer chart', () => {
  // 200 layers of 0.1 mm: 120 cm² for the first half, 30 cm² above.
  const area = new Float32Array(200).map((_, i) => (i < 100 ? 12_000 : 3_000));

  test('the y axis is in cm² up to a round value over the largest layer, the x axis in mm up to the build height', () => {
    const m = areaChartModel(area, 0.1, 400, 100)!;
    expect(m.yMaxMm2).toBe(15_000);
    expect(m.yTicks.map((t) => t.cm2)).toEqual([0, 50, 100, 150]);
    expect(m.yTicks[0].y).toBe(100);
    expect(m.yTicks[3].y).toBe(0);
    expect(m.xTicks[0]).toEqual({ mm: 0, x: 0 });
    expect(m.xTicks.at(-1)!.mm).toBeLessThanOrEqual(20);
    expect(m.xTicks.at(-1)!.x).toBeCloseTo((m.xTicks.at(-1)!.mm / 20) * 400, 6);
    // The profile's first step stands at 120 cm² of 150: four fifths up the plot.
    expect(m.path.startsWith('M0 100 L0.0 20.0')).toBe(true);
  });

  test('the readout names the layer under the pointer, its height, area, share of the bed and whether it is flagged', () => {
    const flagged = new Set([100]);
    expect(readoutAt(area, 0.1, 10, 400, flagged, 40_000)).toEqual({ layer: 6, topMm: expect.closeTo(0.6, 9), areaMm2: 12_000, bedShare: 0.3, flagged: false });
    expect(readoutAt(area, 0.1, 200.5, 400, flagged, 40_000)).toMatchObject({ layer: 101, areaMm2: 3_000, flagged: true });
    // Past either edge the readout holds the end layers.
    expect(readoutAt(area, 0.1, 1e6, 400, flagged)).toMatchObject({ layer: 200, bedShare: null });
    expect(areaChartModel(new Float32Array(200).fill(10_000), 0.1, 400, 100)!.yTicks.map((t) => t.cm2)).toEqual([0, 50, 100]);
    expect(readoutAt(area, 0.1, -5, 400, flagged)).toMatchObject({ layer: 1 });
  });

  test('a thin spike survives binning many layers into one pixel', () => {
    const spiky = new Float32Array(1000);
    spiky[503] = 9;
    expect(Math.max(...binMax(spiky, 10))).toBe(9);
  });
});
