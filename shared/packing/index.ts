export * from './types';
export { parseInstance, parseInstanceV2, parseAnyInstance, MAX_TOTAL_QUANTITY, type ParseResult, type ParseResultV2 } from './parse';
export { lowerBound, buildCountLowerBound, inflatedPartVolume } from './bounds';
export { excessProblems, validateLayout } from './validate';
export { orientedSize, usableRegion, layerCount, TOLERANCE_MM } from './geometry';
export { createPacking, pack, packSync, type PackOptions, type PackPhase, type PackRunHooks, type Packing } from './engine';
export { createRandom, type Random } from './prng';
export { parseBischoffRatcliff } from './br';
export { generatePowderBed, type PowderBedOptions } from './generate';
export { splitIntoBuilds, type BuildLine, type BuildSettings, type PlannedBuild, type SplitOutcome } from './split';
export { summariseLayout } from './engine';
export { droppedPlacements, lowestFreeZ, movedPlacements, insideRegion, placementsAtFault, shapeEditFaults, inLiftOrder, turnedOrientation, turnedPlacements, type TurnOutcome } from './edit';
export {
  encodeLayout,
  decodeLayout,
  layoutTransferables,
  toPlacementArrays,
  fromPlacementArrays,
  placementRotation,
  transformAt,
  encodePlacementBytes,
  decodePlacementBytes,
  PlacementBytesError,
  PLACEMENTS_FORMAT,
  type EncodedLayout,
  type PlacementArrays,
  type DecodedPlacementBytes,
  type LayoutProfiles,
} from './codec';
export * from './shape';
