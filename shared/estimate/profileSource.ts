/**
 * What an estimate's per-layer areas were made of: the parts' sliced meshes
 * (some placements possibly counted as boxes, with the reason) or only their
 * bounding boxes. Stored with a kept layout's estimate by the server and
 * worked out the same way for a layout still on screen in the editor.
 */
export interface ProfileCounts {
  /** Placements counted by their sliced mesh. */
  meshPlacements: number;
  /** Placements counted by their bounding box. */
  boxPlacements: number;
  /** Parts counted by their box, and why. */
  boxParts: { name: string; reason: string }[];
}

/** The fields stored beside an estimate; no profile (none could be had) is a box estimate. */
export function profileInfo(profiles: ProfileCounts | null) {
  return {
    profileSource: profiles && profiles.meshPlacements > 0 ? ('mesh' as const) : ('box' as const),
    profileBoxPlacements: profiles ? profiles.boxPlacements : null,
    profileBoxParts: profiles ? profiles.boxParts : [],
  };
}
