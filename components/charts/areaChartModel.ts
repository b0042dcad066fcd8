/**
 * Pure layout of the area-per-layer chart: the filled profile, its axes and
 * the readout at a pointer position (tested without a renderer).
 */
import { niceStep, ticksTo } from './scale';

/** Largest area in each of `bins` runs of layers: a thin spike stays visible when many layers share a pixel. */
export function binMax(values: ArrayLike<number>, bins: number): Float32Array {
  const n = values.length;
  const count = Math.max(1, Math.min(n, Math.floor(bins)));
  const out = new Float32Array(count);
  for (let i = 0; i < n; i++) {
    const b = Math.min(count - 1, Math.floor((i * count) / n));
    if (values[i] > out[b]) out[b] = values[i];
  }
  return out;
}

export interface AreaChartModel {
  /** SVG path of the filled profile in plot pixels (floor at the left, top of the build at the right). */
  path: string;
  /** The area at the top of the y axis, mm^2 (a round value at or above the largest layer and the bed when given). */
  yMaxMm2: number;
  /** Area ticks (cm^2, as labelled) and their y in plot pixels. */
  yTicks: { cm2: number; y: number }[];
  /** Height ticks (mm above the floor) and their x in plot pixels. */
  xTicks: { mm: number; x: number }[];
  /** The x of a layer's middle. */
  layerX(layer: number): number;
}

export function areaChartModel(area: ArrayLike<number>, layerHeightMm: number, widthPx: number, heightPx: number): AreaChartModel | null {
  const n = area.length;
  if (!(widthPx > 0) || n === 0) return null;
  const bins = binMax(area, widthPx);
  let peak = 0;
  for (const v of bins) peak = Math.max(peak, v);
  // In cm^2, the unit a lab reads a cross-section in; the axis reaches a round value over the peak.
  const cm2Ticks = ticksTo(Math.max(peak / 100, 0.01), 3);
  const yMaxMm2 = cm2Ticks[cm2Ticks.length - 1] * 100;
  const y = (mm2: number) => heightPx - (mm2 / yMaxMm2) * heightPx;
  const step = widthPx / bins.length;
  let path = `M0 ${heightPx}`;
  bins.forEach((v, i) => {
    const py = y(v).toFixed(1);
    path += ` L${(i * step).toFixed(1)} ${py} L${((i + 1) * step).toFixed(1)} ${py}`;
  });
  path += ` L${widthPx} ${heightPx} Z`;
  const heightMm = n * layerHeightMm;
  const mmStep = niceStep(heightMm, Math.max(2, Math.min(6, Math.floor(widthPx / 70))));
  const xTicks: { mm: number; x: number }[] = [];
  for (let i = 0; i * mmStep <= heightMm + 1e-9; i++) {
    const v = Number((i * mmStep).toPrecision(12));
    xTicks.push({ mm: v, x: (v / heightMm) * widthPx });
  }
  return {
    path,
    yMaxMm2,
    yTicks: cm2Ticks.map((cm2) => ({ cm2, y: y(cm2 * 100) })),
    xTicks,
    layerX: (layer) => ((layer + 0.5) / n) * widthPx,
  };
}

export interface AreaReadout {
  /** 1-based, as the screens count layers. */
  layer: number;
  /** Height of the layer's top above the floor, mm. */
  topMm: number;
  areaMm2: number;
  /** Share of the bed's area, when it is known. */
  bedShare: number | null;
  /** Whether the layer is one of the flagged sharp changes. */
  flagged: boolean;
}

/** What the readout says for a pointer at `xPx` across a plot `widthPx` wide. */
export function readoutAt(area: ArrayLike<number>, layerHeightMm: number, xPx: number, widthPx: number, flaggedLayers: ReadonlySet<number>, bedAreaMm2?: number): AreaReadout | null {
  const n = area.length;
  if (n === 0 || !(widthPx > 0)) return null;
  const index = Math.min(n - 1, Math.max(0, Math.floor((xPx / widthPx) * n)));
  const areaMm2 = area[index];
  return {
    layer: index + 1,
    topMm: (index + 1) * layerHeightMm,
    areaMm2,
    bedShare: bedAreaMm2 && bedAreaMm2 > 0 ? areaMm2 / bedAreaMm2 : null,
    flagged: flaggedLayers.has(index),
  };
}
