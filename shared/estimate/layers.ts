/** The layer count and length tolerance are the packing contract's: one definition (../packing/geometry). */
export { layerCount, LENGTH_TOLERANCE_MM } from '../packing/geometry';
