// TEMPORARY render check for the viewer components: not to be committed.
import { useMemo, useState } from 'react';
import { ScrollView, Text, View } from 'react-native';
import { ChamberView, LayerSlider, PartPreview, useMeshFile, type PartMesh } from '@/components/viewer';
import { demoLibrary, gear, writeBinaryStl } from '@/shared/geometry';
import { createRandom } from '@/shared/packing';

const CHAMBER: [number, number, number] = [340, 340, 600];

function useLayout(n: number, withMeshes: boolean) {
  return useMemo(() => {
    const rnd = createRandom(7);
    const lib = demoLibrary();
    const partCount = 40;
    const cell = 26;
    const perRow = 12;
    const layerMm = 17;
    const partSizes: number[][] = [];
    const meshes = new Map<number, PartMesh>();
    for (let p = 0; p < partCount; p++) {
      if (withMeshes && p < lib.length) {
        const m = lib[p].mesh;
        const pos = Float32Array.from(m.positions);
        let min = [Infinity, Infinity, Infinity], max = [-Infinity, -Infinity, -Infinity];
        for (let i = 0; i < pos.length; i += 3) for (let a = 0; a < 3; a++) { min[a] = Math.min(min[a], pos[i + a]); max[a] = Math.max(max[a], pos[i + a]); }
        const size = [max[0] - min[0], max[1] - min[1], max[2] - min[2]];
        const k = Math.min(1, (cell - 2) / size[0], (cell - 2) / size[1], (layerMm - 2) / size[2]);
        partSizes.push(size.map((s) => s * k));
        meshes.set(p, { positions: pos, indices: m.indices, sizeMm: size as [number, number, number] });
      } else {
        partSizes.push([8 + rnd() * 16, 8 + rnd() * 16, 4 + rnd() * 11]);
      }
    }
    const positions = new Float32Array(3 * n);
    const sizes = new Float32Array(3 * n);
    const partIndex = new Uint32Array(n);
    const lineIndex = new Uint32Array(n);
    for (let i = 0; i < n; i++) {
      const p = Math.floor(rnd() * partCount);
      const layer = Math.floor(i / (perRow * perRow));
      const r = i % (perRow * perRow);
      partIndex[i] = p;
      lineIndex[i] = p % 7;
      sizes.set(partSizes[p], 3 * i);
      positions.set([12 + (r % perRow) * cell, 12 + Math.floor(r / perRow) * cell, 5 + layer * layerMm], 3 * i);
    }
    let top = 0;
    for (let i = 0; i < n; i++) top = Math.max(top, positions[3 * i + 2] + sizes[3 * i + 2]);
    return { placements: { positions, sizes, partIndex, lineIndex }, meshes: withMeshes ? meshes : undefined, top };
  }, [n, withMeshes]);
}

export default function ViewerCheck() {
  const params = typeof window !== 'undefined' ? new URLSearchParams(window.location.search) : new URLSearchParams();
  const n = Number(params.get('n') ?? 5000);
  const withMeshes = params.get('meshes') === '1';
  const only = params.get('only');
  const layout = useLayout(n, withMeshes);
  const [cut, setCut] = useState<number>(params.get('cut') ? Number(params.get('cut')) : layout.top);
  const [hovered, setHovered] = useState<number | null>(null);

  const stlUrl = useMemo(() => {
    const m = gear({ teeth: 24, rootRadiusMm: 22, tipRadiusMm: 25, boreRadiusMm: 4, thicknessMm: 8, samplesPerTooth: 8 });
    const bytes = writeBinaryStl(m);
    return URL.createObjectURL(new Blob([bytes as BlobPart], { type: 'model/stl' }));
  }, []);
  const file = useMeshFile(stlUrl, { filename: 'gear.stl', unit: 'mm' });

  return (
    <ScrollView contentContainerStyle={{ padding: 16, gap: 16 }}>
      {only !== 'chamber' ? (
        <View style={{ maxWidth: 520, width: '100%' }}>
          <Text testID="mesh-status">mesh: {file.status} {file.error?.message ?? ''} {file.mesh ? `${file.mesh.triangles} triangles` : ''}</Text>
          {file.mesh ? <PartPreview mesh={file.mesh} sizeMm={file.mesh.sizeMm} /> : null}
        </View>
      ) : null}
      {only !== 'part' ? (
        <View style={{ flexDirection: 'row', gap: 12, height: 620 }}>
          <View style={{ flex: 1 }}>
            <ChamberView
              chamberMm={CHAMBER}
              margin={{ xy: 8, bottom: 3, top: 5 }}
              placements={layout.placements}
              meshesByPart={layout.meshes}
              cutHeightMm={cut >= layout.top ? null : cut}
              onHover={setHovered}
              describePlacement={(i) => `line ${layout.placements.lineIndex[i] + 1} · part ${layout.placements.partIndex[i]} · #${i}`}
            />
          </View>
          <View style={{ width: 100 }}>
            <LayerSlider maxHeightMm={layout.top} layerHeightMm={0.1} valueMm={cut} onChange={setCut} />
          </View>
        </View>
      ) : null}
      <Text testID="hovered">hovered: {hovered ?? 'none'}</Text>
    </ScrollView>
  );
}
