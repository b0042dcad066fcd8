/** The layer count and length tolerance are the packing contract's: one definition (../packing/geometry). */
export { layerCount, TOLERANCE_MM as LENGTH_TOLERANCE_MM } from '../packing/geometry';
