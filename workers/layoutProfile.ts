/**
 * A layout's per-layer area and contour from the parts' real meshes, for a
 * layout still on screen (packed or moved by hand, not kept yet), so the
 * editor's numbers are the ones the server will store when it is kept: the
 * same shared slicing (shared/geometry/layoutSlices.ts), the same part keys
 * and the same rules for parts that count as their boxes.
 *
 * The worker downloads each part's stored file itself (once: the turned,
 * resting meshes and their sections stay cached), so nothing large crosses
 * from the page. Exported without the thread so it can be tested in node.
 */
import { profileLayoutFromFiles, RestingMeshCache, type ProfileLayoutPlacement } from '../shared/geometry/layoutSlices';
import { SliceCache } from '../shared/geometry/slice';
import type { LayoutProfileJob, LayoutProfileAnswer } from './mesh.protocol';
import { partFiles, type FetchBytes } from './partMeshes';

/** Keeps its caches between calls: a layout moved by hand is summed again without reading or slicing any file. */
export function createLayoutProfiler(fetchBytes: FetchBytes) {
  const meshes = new RestingMeshCache();
  const slices = new SliceCache();
  return async function profile(job: LayoutProfileJob): Promise<LayoutProfileAnswer> {
    const problem = checkJob(job);
    if (problem) return { ok: false, message: problem };
    const parts = await partFiles(job.parts, meshes, fetchBytes);
    const placements: ProfileLayoutPlacement[] = job.placements;
    const out = profileLayoutFromFiles({ parts, placements, layerHeightMm: job.layerHeightMm, layers: job.layers }, { meshes, slices });
    return {
      ok: true,
      areaProfile: out.areaProfile,
      contourProfile: out.contourProfile,
      meshPlacements: out.meshPlacements,
      boxPlacements: out.boxPlacements,
      boxReasons: out.boxReasons,
    };
  };
}

/** The page builds the job, but a worker still checks what it is sent before slicing. */
function checkJob(job: LayoutProfileJob): string | null {
  if (!job || !Array.isArray(job.parts) || !Array.isArray(job.placements)) return 'the job must list parts and placements';
  if (!(job.layerHeightMm > 0) || !Number.isFinite(job.layerHeightMm)) return 'layerHeightMm must be a positive number';
  if (!Number.isInteger(job.layers) || job.layers < 0 || job.layers > 1_000_000) return 'layers must be a whole number of layers';
  for (const [i, p] of job.placements.entries()) {
    if (!Number.isInteger(p.part) || p.part < 0 || p.part >= job.parts.length) return `placements[${i}].part must name one of the parts`;
  }
  return null;
}
