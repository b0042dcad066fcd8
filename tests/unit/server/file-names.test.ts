/**
 * The name an uploaded file is kept under: no folders, no control characters, at most 255 characters, and the
 * extension kept when a long name is cut (the extension says how the file is read).
 */
import { plainFileName } from '../../../server/services/parts';

test('folders and control characters are dropped; an empty name reads "unnamed"', () => {
  expect(plainFileName('C:\\\\parts\\\\bracket.stl')).toBe('bracket.stl');
  expect(plainFileName('../../etc/clip\u0001.obj')).toBe('clip.obj');
  expect(plainFileName('/')).toBe('unnamed');
});

test('a name past 255 characters is cut in its stem, keeping its extension', () => {
  const long = `${'housing-'.repeat(625)}.stl`;
  expect(long.length).toBe(5004);
  const kept = plainFileName(long);
  expect(kept).toHaveLength(255);
  expect(kept.endsWith('.stl')).toBe(true);
  expect(kept.startsWith('housing-housing-')).toBe(true);
  // No extension to keep (or an implausibly long one): simply cut.
  expect(plainFileName('x'.repeat(300))).toBe('x'.repeat(255));
});
