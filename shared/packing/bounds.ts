import { orientedSize, usableRegion } from './geometry';
import type { PackInstance, PackPart } from './types';

/**
 * No packing of every part can be lower than this (height from the floor):
 *
 *   bottom + max( max_i min_o h_i(o),
 *                 sum_i (sx_i + g)(sy_i + g)(sz_i + g) / ((Ux + g)(Uy + g)) - g )
 *
 * The volume term is the continuous bound of Martello, Pisinger & Vigo,
 * "The three-dimensional bin packing problem", Oper. Res. 48(2), 2000, applied
 * to boxes inflated by the spacing g in a base inflated by g. Zero parts give
 * the bottom margin.
 */
export function lowerBound(instance: Pick<PackInstance, 'chamber' | 'margin' | 'spacing' | 'parts'>): number {
  const g = instance.spacing;
  const { extent } = usableRegion(instance);
  let tallest = 0;
  let inflatedVolume = 0;
  for (const part of instance.parts) {
    if (part.quantity <= 0) continue;
    let minHeight = Infinity;
    let minVolume = Infinity;
    for (const o of part.orientations) {
      const s = orientedSize(part.size, o);
      minHeight = Math.min(minHeight, s[2]);
      minVolume = Math.min(minVolume, (s[0] + g) * (s[1] + g) * (s[2] + g));
    }
    tallest = Math.max(tallest, minHeight);
    inflatedVolume += part.quantity * minVolume;
  }
  const byVolume = inflatedVolume > 0 ? inflatedVolume / ((extent[0] + g) * (extent[1] + g)) - g : 0;
  return instance.margin.bottom + Math.max(tallest, byVolume);
}

/** Inflated volume of one copy of a part (its volume plus its share of the spacing). */
export function inflatedPartVolume(part: PackPart, spacing: number): number {
  const [a, b, c] = part.size;
  return (a + spacing) * (b + spacing) * (c + spacing);
}

/**
 * Continuous lower bound L0 on the number of builds holding all parts
 * (Martello, Pisinger & Vigo 2000), on boxes and usable region inflated by the spacing.
 */
export function buildCountLowerBound(instance: Pick<PackInstance, 'chamber' | 'margin' | 'spacing' | 'parts'>): number {
  const g = instance.spacing;
  const { extent } = usableRegion(instance);
  const capacity = (extent[0] + g) * (extent[1] + g) * (extent[2] + g);
  let total = 0;
  for (const part of instance.parts) total += part.quantity * inflatedPartVolume(part, g);
  return total > 0 ? Math.ceil(total / capacity - 1e-12) : 0;
}
