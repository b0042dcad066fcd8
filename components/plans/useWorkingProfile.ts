/**
 * The per-layer areas of the layout on screen (packed or moved by hand, not
 * kept yet) from the parts' real meshes, sliced in the mesh worker the way
 * the server slices a layout it keeps, so the numbers do not change when the
 * layout is kept. While the packing runs, or until the slices are back, the
 * editor shows its box estimate and says so.
 */
import { useQueries } from '@tanstack/react-query';
import { useEffect, useMemo, useState } from 'react';
import { layerCount } from '../../shared/estimate';
import type { ProfileCounts } from '../../shared/estimate';
import type { PackInstanceInput, PackResult } from '../../shared/packing';
import type { PartView } from '../../shared/schemas/parts';
import type { LayoutProfileJob, LayoutProfilePart } from '../../workers/mesh.protocol';
import { partFileUrl, partQueryOptions } from '../queries/parts';
import { profileLayoutInWorker } from '../viewer';

/** The sliced areas of one layout and what they were made of. */
export type WorkingProfile = ProfileCounts & { areaPerLayerMm2: Float64Array };

/** A layout changed this recently (a drag, a key held down) is sliced once it rests. */
const SETTLE_MS = 250;

/** The part's key as the server's slicing names it: the file, the part in it and the stored turns. */
function partKey(part: PartView): string {
  return `${part.file.sha256}|${part.file.split ? part.file.partIndex : 'all'}|${part.rotationDeg.join(',')}`;
}

/** A part's stored file as a worker downloads and reads it. */
export function profilePartOf(labId: string, part: PartView): LayoutProfilePart {
  // Only a closed, consistently oriented mesh has sections (the server's rule); the others count as boxes.
  const closed = part.watertight && part.oriented;
  return {
    key: partKey(part),
    url: closed ? partFileUrl(labId, part.id) : null,
    filename: part.file.name,
    unit: part.file.unit,
    split: part.file.split,
    partIndex: part.file.split ? part.file.partIndex : 0,
    rotationDeg: [part.rotationDeg[0], part.rotationDeg[1], part.rotationDeg[2]],
    watertight: closed,
  };
}

/** The job for the mesh worker, or null when a part's record is missing or there is nothing to slice. */
export function profileJob(
  labId: string,
  instance: Pick<PackInstanceInput, 'layerHeight' | 'margin'>,
  result: Pick<PackResult, 'placements' | 'height'>,
  partOfLine: (requestLineId: string) => PartView | undefined,
): { job: LayoutProfileJob; names: string[] } | null {
  const layerHeightMm = instance.layerHeight;
  if (layerHeightMm === undefined) return null;
  const layers = layerCount(result.height, instance.margin?.top ?? 0, layerHeightMm);
  if (result.placements.length === 0 || layers === 0) return null;
  const index = new Map<string, number>();
  const job: LayoutProfileJob = { parts: [], placements: [], layerHeightMm, layers };
  const names: string[] = [];
  for (const p of result.placements) {
    const part = partOfLine(p.id);
    if (!part) return null;
    let k = index.get(part.id);
    if (k === undefined) {
      k = job.parts.length;
      index.set(part.id, k);
      job.parts.push(profilePartOf(labId, part));
      names.push(part.name);
    }
    const transform = (p as { transform?: number[] }).transform;
    job.placements.push({ part: k, orientation: p.orientation, position: p.position, size: p.size, ...(transform ? { transform } : {}) });
  }
  return { job, names };
}

function loadedParts(results: { data?: PartView }[]): { loaded: boolean; parts: PartView[] } {
  return { loaded: results.every((q) => !!q.data), parts: results.flatMap((q) => (q.data ? [q.data] : [])) };
}

export function useWorkingProfile(
  labId: string,
  instance: PackInstanceInput | null | undefined,
  result: PackResult | null | undefined,
  partIdOfLine: (requestLineId: string) => string | undefined,
  /** True while the packing still improves the layout: it is sliced when it stops. */
  paused: boolean,
): WorkingProfile | null {
  const partIds = useMemo(() => {
    const ids = new Set<string>();
    for (const p of result?.placements ?? []) {
      const id = partIdOfLine(p.id);
      if (id) ids.add(id);
    }
    return [...ids].sort();
  }, [result, partIdOfLine]);
  // Combined (and structurally shared by react-query), so the records keep their identity until one changes.
  const { loaded, parts } = useQueries({ queries: partIds.map((id) => partQueryOptions(labId, id)), combine: loadedParts });
  const byId = useMemo(() => new Map(parts.map((p) => [p.id, p] as const)), [parts]);

  const [sliced, setSliced] = useState<{ for: PackResult; profile: WorkingProfile } | null>(null);
  useEffect(() => {
    if (!instance || !result || paused || !loaded) return;
    const made = profileJob(labId, instance, result, (lineId) => {
      const id = partIdOfLine(lineId);
      return id ? byId.get(id) : undefined;
    });
    if (!made) return;
    let stale = false;
    const timer = setTimeout(() => {
      void profileLayoutInWorker(made.job).then((answer) => {
        if (stale || !answer) return;
        setSliced({
          for: result,
          profile: {
            areaPerLayerMm2: answer.areaProfile,
            meshPlacements: answer.meshPlacements,
            boxPlacements: answer.boxPlacements,
            boxParts: answer.boxReasons.map((r) => ({ name: made.names[r.part] ?? `part ${r.part + 1}`, reason: r.reason })),
          },
        });
      });
    }, SETTLE_MS);
    return () => {
      stale = true;
      clearTimeout(timer);
    };
  }, [labId, instance, result, paused, loaded, byId, partIdOfLine]);

  return sliced && sliced.for === result ? sliced.profile : null;
}
