/**
 * Downloads a stored mesh file and parses it off the main thread, in the
 * mesh worker. The cache around it is react-query's (components/queries/
 * meshFiles.ts); this module only knows how to turn a URL into a mesh or a
 * failure a person can act on.
 */
import * as Comlink from 'comlink';
import type { LayoutProfileAnswer, LayoutProfileJob } from '../../workers/mesh.protocol';
import type { MeshProblem, MeshWorkerApi, ParseMeshResult, ViewMesh } from './types';

export type MeshUnit = 'mm' | 'cm' | 'inch';

export interface MeshFileOptions {
  /** File name with its extension; read from Content-Disposition, then from the URL, when left out. */
  filename?: string;
  /** Unit for STL and OBJ (a 3MF's own unit wins). */
  unit?: MeshUnit;
  /** Only this part of a 3MF with several. */
  partName?: string;
}

export interface MeshFileError {
  message: string;
  problems: MeshProblem[];
}

/** A download or parse that failed, with the parser's problems when it got that far. */
export class MeshFileLoadError extends Error implements MeshFileError {
  readonly problems: MeshProblem[];
  constructor(message: string, problems: MeshProblem[] = []) {
    super(message);
    this.name = 'MeshFileLoadError';
    this.problems = problems;
  }
}

/** Parses a file's bytes into a mesh; the worker's `parseMesh` unless a caller gives another. */
export type ParseMesh = (bytes: ArrayBuffer, filename: string, unit: MeshUnit, options?: { partName?: string }) => Promise<ParseMeshResult>;

let worker: Worker | null = null;
let remote: Comlink.Remote<MeshWorkerApi> | null = null;

function meshWorker(): Comlink.Remote<MeshWorkerApi> {
  if (!remote) {
    // Metro bundles a worker written exactly this way (a literal path in new URL with window.location.href).
    worker = new Worker(new URL('../../workers/mesh.worker.ts', window.location.href));
    worker.addEventListener('error', resetWorker);
    remote = Comlink.wrap<MeshWorkerApi>(worker);
  }
  return remote;
}

/** A worker that crashed (or ran out of memory) is replaced on the next request. */
function resetWorker() {
  worker?.terminate();
  worker = null;
  remote?.[Comlink.releaseProxy]();
  remote = null;
}

const parseInWorker: ParseMesh = (bytes, filename, unit, options) => meshWorker().parseMesh(Comlink.transfer(bytes, [bytes]), filename, unit, options);

/**
 * A layout's per-layer areas from its parts' real meshes, sliced in the mesh
 * worker (which downloads and caches the files); null without a worker (the
 * native app) or when the worker failed, so the caller keeps its box estimate.
 */
export async function profileLayoutInWorker(job: LayoutProfileJob): Promise<Extract<LayoutProfileAnswer, { ok: true }> | null> {
  if (typeof Worker !== 'function') return null;
  try {
    // The worker may run from a bundle's own address: it is given whole addresses to download from.
    const parts = job.parts.map((p) => (p.url ? { ...p, url: new URL(p.url, pageUrl()).href } : p));
    const answer = await meshWorker().profileLayout({ ...job, parts });
    return answer.ok && answer.areaProfile instanceof Float64Array && answer.areaProfile.length === job.layers ? answer : null;
  } catch {
    resetWorker();
    return null;
  }
}

function pageUrl(): string {
  return typeof location === 'undefined' ? 'http://localhost/' : location.href;
}

export function filenameFrom(response: Pick<Response, 'headers'>, url: string): string {
  const header = response.headers.get('content-disposition') ?? '';
  const star = /filename\*\s*=\s*UTF-8''([^;]+)/i.exec(header);
  if (star) return decodeURIComponent(star[1]);
  const plain = /filename\s*=\s*"?([^";]+)"?/i.exec(header);
  if (plain) return plain[1];
  const path = new URL(url, pageUrl()).pathname;
  return decodeURIComponent(path.slice(path.lastIndexOf('/') + 1));
}

/** A worker answer is checked before the views trust it. */
function isMesh(m: unknown): m is Required<ViewMesh> {
  const v = m as Required<ViewMesh>;
  return !!v && v.positions instanceof Float32Array && v.indices instanceof Uint32Array && v.positions.length % 3 === 0 && v.indices.length % 3 === 0 && Array.isArray(v.sizeMm);
}

/**
 * The mesh of one stored file, or a MeshFileLoadError saying what went wrong.
 * `parse` is the mesh worker unless given (a test parses in-process).
 */
export async function fetchMeshFile(url: string, options: MeshFileOptions = {}, parse?: ParseMesh): Promise<Required<ViewMesh>> {
  if (!parse && typeof Worker !== 'function') throw new MeshFileLoadError('The 3D preview needs the web app; the measurements are shown instead.');
  let response: Response;
  try {
    response = await fetch(url, { credentials: 'same-origin' });
  } catch {
    throw new MeshFileLoadError('The file could not be downloaded: check the connection and retry.');
  }
  if (!response.ok) {
    let message = `The file could not be downloaded (HTTP ${response.status}).`;
    try {
      const body = (await response.json()) as { error?: { message?: string } };
      if (body?.error?.message) message = body.error.message;
    } catch {
      // not JSON: keep the status line
    }
    throw new MeshFileLoadError(message);
  }
  const filename = options.filename ?? filenameFrom(response, url);
  const bytes = await response.arrayBuffer();
  let result: ParseMeshResult;
  try {
    result = await (parse ?? parseInWorker)(bytes, filename, options.unit ?? 'mm', options.partName ? { partName: options.partName } : undefined);
  } catch (err) {
    if (!parse) resetWorker();
    throw new MeshFileLoadError(`The file could not be parsed: ${err instanceof Error ? err.message : String(err)}. Retry, or open a smaller file.`);
  }
  if (!result.ok) throw new MeshFileLoadError(result.problems.map((p) => p.message).join(' '), result.problems);
  if (!isMesh(result.mesh)) throw new MeshFileLoadError('The mesh worker sent back something that is not a mesh.');
  return result.mesh;
}
