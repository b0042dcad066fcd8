/**
 * 3MF packages built to expand far past their size, and ones with numbers too
 * large to compute with: the shapes of hostile uploads the server must refuse.
 */
import { strToU8, zipSync } from 'fflate';

export const CORE_NS = 'http://schemas.microsoft.com/3dmanufacturing/core/2015/02';
export const RELS_XML =
  '<?xml version="1.0"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">' +
  '<Relationship Id="r" Target="/3D/3dmodel.model" Type="http://schemas.microsoft.com/3dmanufacturing/2013/01/3dmodel"/></Relationships>';

/** A 10 mm cube's mesh element: 8 vertices, 12 outward triangles. */
function cubeMesh(size = 10): string {
  const s = size;
  const v = [[0, 0, 0], [s, 0, 0], [s, s, 0], [0, s, 0], [0, 0, s], [s, 0, s], [s, s, s], [0, s, s]];
  const quads = [[0, 3, 2, 1], [4, 5, 6, 7], [0, 1, 5, 4], [1, 2, 6, 5], [2, 3, 7, 6], [3, 0, 4, 7]];
  const tris = quads.flatMap(([a, b, c, d]) => [[a, b, c], [a, c, d]]);
  return (
    '<mesh><vertices>' +
    v.map(([x, y, z]) => `<vertex x="${x}" y="${y}" z="${z}"/>`).join('') +
    '</vertices><triangles>' +
    tris.map(([a, b, c]) => `<triangle v1="${a}" v2="${b}" v3="${c}"/>`).join('') +
    '</triangles></mesh>'
  );
}

export function package3mf(modelXml: string | Uint8Array, level: 0 | 6 | 9 = 6): Uint8Array {
  const model = typeof modelXml === 'string' ? strToU8(modelXml) : modelXml;
  return zipSync({ '_rels/.rels': strToU8(RELS_XML), '3D/3dmodel.model': model }, { level });
}

/**
 * Object 1 is a 12-triangle cube; every object above it holds the one below
 * twice, `levels` times: the build item expands to 12 × 2^levels triangles
 * (16 levels: 786,432) from about a kilobyte of file.
 */
export function doublingChain3mf(levels: number): Uint8Array {
  let objects = `<object id="1" type="model">${cubeMesh()}</object>`;
  for (let k = 2; k <= levels + 1; k++) {
    objects += `<object id="${k}" type="model"><components><component objectid="${k - 1}"/><component objectid="${k - 1}"/></components></object>`;
  }
  return package3mf(`<model unit="millimeter" xmlns="${CORE_NS}"><resources>${objects}</resources><build><item objectid="${levels + 1}"/></build></model>`, 9);
}

/** A build plate of `copies` cubes side by side, each a component of one object: ordinary instancing. */
export function plateOfCopies3mf(copies: number): Uint8Array {
  const comps = Array.from({ length: copies }, (_, i) => `<component objectid="1" transform="1 0 0 0 1 0 0 0 1 ${(i % 10) * 12} ${Math.floor(i / 10) * 12} 0"/>`).join('');
  return package3mf(`<model unit="millimeter" xmlns="${CORE_NS}"><resources><object id="1">${cubeMesh()}</object><object id="2"><components>${comps}</components></object></resources><build><item objectid="2"/></build></model>`);
}

/** A valid cube model padded with `padBytes` spaces, which DEFLATE shrinks about a thousandfold. */
export function paddedModel(padBytes: number): Uint8Array {
  const xml = strToU8(`<model unit="millimeter" xmlns="${CORE_NS}"><resources><object id="1">${cubeMesh()}</object></resources><build><item objectid="1"/></build></model>`);
  const model = new Uint8Array(xml.length + padBytes).fill(0x20);
  model.set(xml);
  return model;
}

/**
 * A ZIP bomb whose headers lie: the model inflates to `padBytes` and more,
 * but its local and central headers declare `declaredBytes`
 * (APPNOTE.TXT §4.3.7 local header: uncompressed size at +22; §4.3.12
 * central header: at +24).
 */
export function lyingBomb3mf(padBytes: number, declaredBytes = 4096): Uint8Array {
  const bytes = package3mf(paddedModel(padBytes), 9);
  const name = strToU8('3D/3dmodel.model');
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const nameAt = (at: number) => name.every((c, i) => bytes[at + i] === c);
  for (let i = 0; i + 46 < bytes.length; i++) {
    const sig = view.getUint32(i, true);
    if (sig === 0x04034b50 && nameAt(i + 30)) view.setUint32(i + 22, declaredBytes, true);
    if (sig === 0x02014b50 && nameAt(i + 46)) view.setUint32(i + 24, declaredBytes, true);
  }
  return bytes;
}

/** A cube in metres whose first vertex sits at 1e306 m: finite in the file, infinite once in millimetres. */
export function hugeMetres3mf(): Uint8Array {
  const xml = `<model unit="meter" xmlns="${CORE_NS}"><resources><object id="1">${cubeMesh(1)}</object></resources><build><item objectid="1"/></build></model>`;
  return package3mf(xml.replace('<vertex x="0" y="0" z="0"/>', '<vertex x="1e306" y="0" z="0"/>'));
}
