import { hatchSeconds, scanSpeedMmPerS } from './scan';

export interface PrintTimeMachine {
  laserPowerW: number;
  recoatSeconds: number;
  preheatSeconds: number;
}

export interface PrintTimeMaterial {
  energyDensityJPerMm2: number;
  hatchSpacingMm: number;
}

export interface PrintTimeEstimate {
  layerCount: number;
  scanSpeedMmPerS: number;
  /** All of the following are after the print-time scale. */
  preheatSeconds: number;
  recoatSeconds: number;
  scanSeconds: number;
  /** Recoat plus scan over all layers: the time after preheat until the last layer is done. */
  layersSeconds: number;
  /** Preheat plus layers. */
  printSeconds: number;
  printTimeScale: number;
}

/**
 * Print time = preheat + sum over layers of (recoat + scan), with the scan of a layer = its area / (v h) and
 * v = P / (E h). Takes the area per layer rather than the parts, so a profile sliced from real meshes
 * can replace the bounding-box one without changing this code. Every layer is recoated, empty or not.
 *
 * The print-time scale comes from calibration against recorded runs. Those record the hours from the start
 * of preheat to the end of the last layer, so the scale applies to the whole print time.
 */
export function printTimeEstimate(
  areaPerLayerMm2: ArrayLike<number>,
  machine: PrintTimeMachine,
  material: PrintTimeMaterial,
  printTimeScale = 1,
): PrintTimeEstimate {
  const speed = scanSpeedMmPerS(machine.laserPowerW, material.energyDensityJPerMm2, material.hatchSpacingMm);
  let totalAreaMm2 = 0;
  for (let l = 0; l < areaPerLayerMm2.length; l++) totalAreaMm2 += areaPerLayerMm2[l];
  const layers = areaPerLayerMm2.length;
  const preheatSeconds = machine.preheatSeconds * printTimeScale;
  const recoatSeconds = layers * machine.recoatSeconds * printTimeScale;
  const scanSeconds = hatchSeconds(totalAreaMm2, speed, material.hatchSpacingMm) * printTimeScale;
  const layersSeconds = recoatSeconds + scanSeconds;
  return {
    layerCount: layers,
    scanSpeedMmPerS: speed,
    preheatSeconds,
    recoatSeconds,
    scanSeconds,
    layersSeconds,
    printSeconds: preheatSeconds + layersSeconds,
    printTimeScale,
  };
}
