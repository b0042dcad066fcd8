/**
 * What each warning the server gives means for the print, in the words a
 * designer uses. The server's message says what it found; this says why it
 * matters and what to do.
 */
export const WARNING_LABELS: Record<string, string> = {
  'not-watertight': 'Not watertight',
  'inconsistent-orientation': 'Mixed triangle facing',
  'inside-out': 'Inside out',
  'maybe-wrong-unit-small': 'Wrong unit?',
  'too-large-for-machines': 'Too big for every machine',
  thin: 'Thin walls',
  'empty-facets': 'Empty facets left out',
};

export const WARNING_EXPLANATIONS: Record<string, string> = {
  'not-watertight':
    'The surface has holes or edges shared by more than two triangles, so inside and outside are not well defined. The laser may fill the wrong regions and the volume, mass and cost figures are unreliable. Repair the mesh in the design tool and upload it again.',
  'inconsistent-orientation':
    'Some triangles face inward while their neighbours face outward. Slicing may then treat parts of the solid as empty. Most design tools can unify the normals on export.',
  'inside-out':
    'Every triangle faces inward, so the solid reads as a hole. Flip the normals on export and upload again.',
  'maybe-wrong-unit-small':
    'Every side is under 2 mm, which usually means the file was drawn in centimetres or inches and read as millimetres. Upload it again with the right unit if so.',
  'too-large-for-machines':
    'The part does not fit the largest chamber of the lab’s machines in any upright or side-on orientation. Check the unit first; otherwise it has to be split into pieces.',
  'empty-facets':
    'Some facets of the file have no area (two corners at the same point) or repeat another facet. They are not part of the surface, so Sinterstack leaves them out; the solid is the same. Many design tools write them on export; nothing needs doing unless the part is also flagged as not watertight.',
  thin: 'Walls this thin may not sinter into a solid skin, may warp or break at breakout and blasting. Thicken them, or check the material’s minimum wall thickness.',
};

export const WARNING_CODES = Object.keys(WARNING_LABELS);

export function warningLabel(code: string): string {
  return WARNING_LABELS[code] ?? code;
}
