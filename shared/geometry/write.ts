/**
 * Writers for the demo library and for exporting builds.
 *
 * STL (StereoLithography Interface Specification, 1989): binary is an 80-byte
 * header, a uint32 facet count and 50 bytes a facet (normal, three vertices as
 * float32, uint16 attribute count 0), little-endian; ASCII uses the
 * solid/facet/outer loop/vertex keywords. Normals are computed from the
 * counter-clockwise vertex order.
 *
 * 3MF (3MF Core Specification): an OPC ZIP with [Content_Types].xml,
 * _rels/.rels pointing at /3D/3dmodel.model, objects as meshes with 0-based
 * indices, build items carrying "m00 m01 m02 m10 m11 m12 m20 m21 m22 m30 m31 m32"
 * row-vector transforms (§3.3) and the model's unit (§3.4).
 */
import { zipSync, strToU8 } from 'fflate';
import type { MeshData } from './types';
import { CORE_NS, MODEL_REL_TYPE } from './threemf';

function facetNormal(p: Float64Array, a: number, b: number, c: number): [number, number, number] {
  const ux = p[b] - p[a], uy = p[b + 1] - p[a + 1], uz = p[b + 2] - p[a + 2];
  const vx = p[c] - p[a], vy = p[c + 1] - p[a + 1], vz = p[c + 2] - p[a + 2];
  const nx = uy * vz - uz * vy, ny = uz * vx - ux * vz, nz = ux * vy - uy * vx;
  const len = Math.sqrt(nx * nx + ny * ny + nz * nz) || 1;
  return [nx / len, ny / len, nz / len];
}

export function writeBinaryStl(mesh: MeshData, header = 'binary STL'): Uint8Array {
  const count = mesh.indices.length / 3;
  const out = new Uint8Array(84 + 50 * count);
  const view = new DataView(out.buffer);
  // The header must not start with "solid", or some readers would take the file for ASCII.
  const text = strToU8(header.replace(/^solid/i, 'mesh').slice(0, 80));
  out.set(text.subarray(0, 80));
  view.setUint32(80, count, true);
  const p = mesh.positions;
  const t = mesh.indices;
  let o = 84;
  for (let f = 0; f < count; f++) {
    const a = t[f * 3] * 3, b = t[f * 3 + 1] * 3, c = t[f * 3 + 2] * 3;
    const n = facetNormal(p, a, b, c);
    for (let k = 0; k < 3; k++) view.setFloat32(o + k * 4, n[k], true);
    o += 12;
    for (const v of [a, b, c]) {
      view.setFloat32(o, p[v], true);
      view.setFloat32(o + 4, p[v + 1], true);
      view.setFloat32(o + 8, p[v + 2], true);
      o += 12;
    }
    view.setUint16(o, 0, true);
    o += 2;
  }
  return out;
}

export function writeAsciiStl(mesh: MeshData, solidName = 'part'): Uint8Array {
  const name = solidName.replace(/\s+/g, '_') || 'part';
  const p = mesh.positions;
  const t = mesh.indices;
  const lines: string[] = [`solid ${name}`];
  for (let f = 0; f < t.length; f += 3) {
    const a = t[f] * 3, b = t[f + 1] * 3, c = t[f + 2] * 3;
    const n = facetNormal(p, a, b, c);
    lines.push(`  facet normal ${n.map(num).join(' ')}`, '    outer loop');
    for (const v of [a, b, c]) lines.push(`      vertex ${num(p[v])} ${num(p[v + 1])} ${num(p[v + 2])}`);
    lines.push('    endloop', '  endfacet');
  }
  lines.push(`endsolid ${name}`, '');
  return strToU8(lines.join('\n'));
}

function num(n: number): string {
  // Shortest text that reads back to the same float64.
  return Object.is(n, -0) ? '0' : String(n);
}

export interface ThreeMfObjectInput {
  name: string;
  positions: Float64Array | Float32Array;
  indices: Uint32Array;
}

export interface ThreeMfItemInput {
  objectIndex: number;
  /** Row-vector affine transform m00 m01 m02 m10 m11 m12 m20 m21 m22 m30 m31 m32 (3MF Core §3.3). */
  transform: readonly number[];
  partNumber?: string;
}

export type ThreeMfUnit = 'micron' | 'millimeter' | 'centimeter' | 'inch' | 'foot' | 'meter';

const CONTENT_TYPES = `<?xml version="1.0" encoding="UTF-8"?>
<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">
  <Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/>
  <Default Extension="model" ContentType="application/vnd.ms-package.3dmanufacturing-3dmodel+xml"/>
</Types>
`;

const RELS = `<?xml version="1.0" encoding="UTF-8"?>
<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">
  <Relationship Id="rel0" Target="/3D/3dmodel.model" Type="${MODEL_REL_TYPE}"/>
</Relationships>
`;

function escapeXml(s: string): string {
  return s.replace(/[<>&"']/g, (c) => ({ '<': '&lt;', '>': '&gt;', '&': '&amp;', '"': '&quot;', "'": '&apos;' })[c]!);
}

/** Builds the 3D model XML: one object per mesh (ids 1..n), one build item per placement. */
export function write3mfModelXml(objects: ThreeMfObjectInput[], items: ThreeMfItemInput[], unit: ThreeMfUnit = 'millimeter'): string {
  for (const item of items) {
    if (!Number.isInteger(item.objectIndex) || item.objectIndex < 0 || item.objectIndex >= objects.length) {
      throw new RangeError(`write3mf: build item refers to object ${item.objectIndex}, but there are ${objects.length}`);
    }
    if (item.transform.length !== 12 || !item.transform.every(Number.isFinite)) {
      throw new RangeError('write3mf: a build item transform needs 12 finite numbers');
    }
  }
  const chunks: string[] = [
    '<?xml version="1.0" encoding="UTF-8"?>\n',
    `<model unit="${unit}" xml:lang="en-US" xmlns="${CORE_NS}">\n`,
    ' <resources>\n',
  ];
  objects.forEach((object, i) => {
    chunks.push(`  <object id="${i + 1}" name="${escapeXml(object.name)}" type="model">\n   <mesh>\n    <vertices>\n`);
    const p = object.positions;
    const lines: string[] = [];
    for (let v = 0; v < p.length; v += 3) lines.push(`     <vertex x="${num(p[v])}" y="${num(p[v + 1])}" z="${num(p[v + 2])}"/>\n`);
    chunks.push(lines.join(''), '    </vertices>\n    <triangles>\n');
    const t = object.indices;
    const tris: string[] = [];
    for (let f = 0; f < t.length; f += 3) tris.push(`     <triangle v1="${t[f]}" v2="${t[f + 1]}" v3="${t[f + 2]}"/>\n`);
    chunks.push(tris.join(''), '    </triangles>\n   </mesh>\n  </object>\n');
  });
  chunks.push(' </resources>\n <build>\n');
  for (const item of items) {
    const pn = item.partNumber ? ` partnumber="${escapeXml(item.partNumber)}"` : '';
    chunks.push(`  <item objectid="${item.objectIndex + 1}" transform="${item.transform.map(num).join(' ')}"${pn}/>\n`);
  }
  chunks.push(' </build>\n</model>\n');
  return chunks.join('');
}

/** A complete 3MF package for several objects placed by build items (for example a packed build). */
export function write3mf(objects: ThreeMfObjectInput[], items: ThreeMfItemInput[], unit: ThreeMfUnit = 'millimeter'): Uint8Array {
  const model = write3mfModelXml(objects, items, unit);
  return zipSync(
    {
      '[Content_Types].xml': strToU8(CONTENT_TYPES),
      '_rels/.rels': strToU8(RELS),
      '3D/3dmodel.model': strToU8(model),
    },
    { level: 6 },
  );
}

/** A translation as a 3MF transform. */
export function translation(x: number, y: number, z: number): number[] {
  return [1, 0, 0, 0, 1, 0, 0, 0, 1, x, y, z];
}
