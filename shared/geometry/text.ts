import { strFromU8 } from 'fflate';

/**
 * Decodes a text mesh format (ASCII STL, OBJ). Their keywords and numbers are
 * ASCII, so UTF-8 and Latin-1 read them alike; the platform's TextDecoder (a
 * web standard, also in Node and React Native's engine) is several times
 * faster on large files than building the string in JavaScript.
 */
export function decodeText(bytes: Uint8Array): string {
  if (typeof TextDecoder !== 'undefined') return new TextDecoder('utf-8').decode(bytes);
  return strFromU8(bytes, true);
}
