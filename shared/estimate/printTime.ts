import { hatchSeconds, scanSpeedMmPerS } from './scan';

export interface PrintTimeMachine {
  laserPowerW: number;
  scannerMaxSpeedMmPerS: number;
  recoatSeconds: number;
  minLayerSeconds: number;
  preheatSeconds: number;
}

export interface PrintTimeMaterial {
  volumetricEnergyDensityJPerMm3: number;
  hatchSpacingMm: number;
  contourPasses: number;
}

export interface PrintTimeFactors {
  layerTimeScale: number;
  scanTimeScale: number;
}

export interface PrintTimeEstimate {
  layerCount: number;
  scanSpeedMmPerS: number;
  /** The speed E_V asks for was above the scanner's top speed and was held at it. */
  scanSpeedCapped: boolean;
  /** All of the following are after the calibration factors. */
  preheatSeconds: number;
  recoatSeconds: number;
  /** Hatching the cross-sections. */
  scanSeconds: number;
  /** Drawing the contours. */
  contourSeconds: number;
  /** Waiting for the machine's minimum layer time. */
  otherSeconds: number;
  /** Recoat, scan, contour and waits over all layers: the time after preheat until the last layer is done. */
  layersSeconds: number;
  /** Preheat plus layers. */
  printSeconds: number;
}

/**
 * Print time = preheat + sum over layers of max(recoat + hatch + contour, minimum layer time), with
 * hatch = A / (v h), contour = passes x C / v and v = min(P / (E_V h t), top speed). The area A and contour length C
 * of each layer come from the caller: real slices where they exist, the boxes otherwise. Every layer is recoated,
 * empty or not. The layer factor multiplies preheat, recoat and the minimum layer time, the scan factor hatch and
 * contour; with both equal the whole print time scales by it.
 */
export function printTimeEstimate(
  areaPerLayerMm2: ArrayLike<number>,
  contourPerLayerMm: ArrayLike<number>,
  layerHeightMm: number,
  machine: PrintTimeMachine,
  material: PrintTimeMaterial,
  factors: PrintTimeFactors = { layerTimeScale: 1, scanTimeScale: 1 },
): PrintTimeEstimate {
  const { speedMmPerS, capped } = scanSpeedMmPerS(
    machine.laserPowerW,
    material.volumetricEnergyDensityJPerMm3,
    material.hatchSpacingMm,
    layerHeightMm,
    machine.scannerMaxSpeedMmPerS,
  );
  const layers = areaPerLayerMm2.length;
  const recoat = machine.recoatSeconds * factors.layerTimeScale;
  const minLayer = machine.minLayerSeconds * factors.layerTimeScale;
  let scanSeconds = 0;
  let contourSeconds = 0;
  let otherSeconds = 0;
  for (let l = 0; l < layers; l++) {
    const hatch = hatchSeconds(areaPerLayerMm2[l], speedMmPerS, material.hatchSpacingMm) * factors.scanTimeScale;
    const contour = ((material.contourPasses * (contourPerLayerMm[l] ?? 0)) / speedMmPerS) * factors.scanTimeScale;
    scanSeconds += hatch;
    contourSeconds += contour;
    otherSeconds += Math.max(0, minLayer - (recoat + hatch + contour));
  }
  const preheatSeconds = machine.preheatSeconds * factors.layerTimeScale;
  const recoatSeconds = recoat * layers;
  const layersSeconds = recoatSeconds + scanSeconds + contourSeconds + otherSeconds;
  return {
    layerCount: layers,
    scanSpeedMmPerS: speedMmPerS,
    scanSpeedCapped: capped,
    preheatSeconds,
    recoatSeconds,
    scanSeconds,
    contourSeconds,
    otherSeconds,
    layersSeconds,
    printSeconds: preheatSeconds + layersSeconds,
  };
}
