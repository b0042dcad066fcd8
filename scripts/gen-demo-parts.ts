/**
 * Writes the demo lab's part library (invented shapes from shared/geometry)
 * as files a designer would upload: one binary STL per part, one ASCII STL,
 * one 3MF holding every part as a build item, and a manifest with each part's
 * measured metrics.
 *
 *   npx tsx scripts/gen-demo-parts.ts [output folder, default .data/demo-parts]
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { demoLibrary, measureMesh, translation, write3mf, writeAsciiStl, writeBinaryStl } from '../shared/geometry';

const outDir = path.resolve(process.argv[2] ?? '.data/demo-parts');
mkdirSync(outDir, { recursive: true });

const library = demoLibrary();
const slug = (name: string) => name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/(^-|-$)/g, '');
const manifest = library.map((part) => {
  const file = `${slug(part.name)}.stl`;
  writeFileSync(path.join(outDir, file), writeBinaryStl(part.mesh, part.name));
  const m = measureMesh(part.mesh);
  return { name: part.name, kind: part.kind, file, sizeMm: m.sizeMm, volumeMm3: m.volumeMm3, areaMm2: m.areaMm2, triangles: m.triangles, watertight: m.watertight };
});

// One ASCII STL, so the library exercises both STL encodings.
writeFileSync(path.join(outDir, `${slug(library[0].name)}-ascii.stl`), writeAsciiStl(library[0].mesh, slug(library[0].name)));

// Every part side by side in one package, 10 mm apart along x.
let x = 0;
const items = library.map((part, i) => {
  const m = measureMesh(part.mesh);
  const item = { objectIndex: i, transform: translation(x - m.bboxMinMm[0], -m.bboxMinMm[1], -m.bboxMinMm[2]) };
  x += m.sizeMm[0] + 10;
  return item;
});
writeFileSync(path.join(outDir, 'demo-library.3mf'), write3mf(library.map((p) => ({ name: p.name, ...p.mesh })), items, 'millimeter'));
writeFileSync(path.join(outDir, 'manifest.json'), JSON.stringify(manifest, null, 2) + '\n');
console.log(`wrote ${library.length} STL files, 1 ASCII STL and demo-library.3mf to ${outDir}`);
