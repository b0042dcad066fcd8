/**
 * Fetches a stored mesh file and parses it in the mesh worker. Results are
 * cached by URL (with the unit and part asked for), so the part page, the
 * library's previews and the chamber view share one parse and one copy of
 * the arrays.
 */
import * as Comlink from 'comlink';
import { useCallback, useEffect, useState } from 'react';
import type { MeshProblem, MeshWorkerApi, ViewMesh } from './types';

export type MeshUnit = 'mm' | 'cm' | 'inch';

export interface MeshFileOptions {
  /** File name with its extension; read from Content-Disposition, then from the URL, when left out. */
  filename?: string;
  /** Unit for STL and OBJ (a 3MF's own unit wins). */
  unit?: MeshUnit;
  /** Only this part of a 3MF with several. */
  partName?: string;
}

export type MeshFileState =
  | { status: 'idle'; mesh: null; error: null; retry: () => void }
  | { status: 'loading'; mesh: null; error: null; retry: () => void }
  | { status: 'ready'; mesh: Required<ViewMesh>; error: null; retry: () => void }
  | { status: 'error'; mesh: null; error: MeshFileError; retry: () => void };

export interface MeshFileError {
  message: string;
  problems: MeshProblem[];
}

type Outcome = { ok: true; mesh: Required<ViewMesh> } | { ok: false; error: MeshFileError };

// Enough for a page of library previews; older entries are dropped first.
const CACHE_LIMIT = 24;
const cache = new Map<string, Promise<Outcome>>();

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

function filenameFrom(response: Response, url: string): string {
  const header = response.headers.get('content-disposition') ?? '';
  const star = /filename\*\s*=\s*UTF-8''([^;]+)/i.exec(header);
  if (star) return decodeURIComponent(star[1]);
  const plain = /filename\s*=\s*"?([^";]+)"?/i.exec(header);
  if (plain) return plain[1];
  const path = new URL(url, window.location.href).pathname;
  return decodeURIComponent(path.slice(path.lastIndexOf('/') + 1));
}

function failure(message: string, problems: MeshProblem[] = []): Outcome {
  return { ok: false, error: { message, problems } };
}

/** A worker answer is checked before the views trust it. */
function isMesh(m: unknown): m is Required<ViewMesh> {
  const v = m as Required<ViewMesh>;
  return !!v && v.positions instanceof Float32Array && v.indices instanceof Uint32Array && v.positions.length % 3 === 0 && v.indices.length % 3 === 0 && Array.isArray(v.sizeMm);
}

async function load(url: string, options: MeshFileOptions): Promise<Outcome> {
  if (typeof Worker !== 'function') return failure('The 3D preview needs the web app; the measurements are shown instead.');
  let response: Response;
  try {
    response = await fetch(url, { credentials: 'same-origin' });
  } catch {
    return failure('The file could not be downloaded: check the connection and retry.');
  }
  if (!response.ok) {
    let message = `The file could not be downloaded (HTTP ${response.status}).`;
    try {
      const body = (await response.json()) as { error?: { message?: string } };
      if (body?.error?.message) message = body.error.message;
    } catch {
      // not JSON: keep the status line
    }
    return failure(message);
  }
  const filename = options.filename ?? filenameFrom(response, url);
  const bytes = await response.arrayBuffer();
  try {
    const result = await meshWorker().parseMesh(Comlink.transfer(bytes, [bytes]), filename, options.unit ?? 'mm', options.partName ? { partName: options.partName } : undefined);
    if (result.ok && isMesh(result.mesh)) return { ok: true, mesh: result.mesh };
    if (!result.ok) return failure(result.problems.map((p) => p.message).join(' '), result.problems);
    return failure('The mesh worker sent back something that is not a mesh.');
  } catch (err) {
    resetWorker();
    return failure(`The file could not be parsed: ${err instanceof Error ? err.message : String(err)}. Retry, or open a smaller file.`);
  }
}

function cacheKey(url: string, options: MeshFileOptions): string {
  return `${url}\u0000${options.unit ?? 'mm'}\u0000${options.partName ?? ''}\u0000${options.filename ?? ''}`;
}

/** Starts (or reuses) the load of one file. Failures are not cached, so a retry fetches again. */
export function loadMeshFile(url: string, options: MeshFileOptions = {}): Promise<Outcome> {
  const key = cacheKey(url, options);
  const hit = cache.get(key);
  if (hit) {
    cache.delete(key);
    cache.set(key, hit);
    return hit;
  }
  const pending = load(url, options).then((outcome) => {
    if (!outcome.ok) cache.delete(key);
    return outcome;
  });
  cache.set(key, pending);
  while (cache.size > CACHE_LIMIT) cache.delete(cache.keys().next().value as string);
  return pending;
}

/** Drops cached meshes (all, or one URL's), e.g. after a part's file is replaced. */
export function forgetMeshFile(url?: string) {
  if (url === undefined) return cache.clear();
  for (const key of [...cache.keys()]) if (key.startsWith(`${url}\u0000`)) cache.delete(key);
}

/**
 * `useMeshFile('/api/labs/1/parts/7/file', { unit: 'mm' })` -> { status, mesh, error, retry }.
 * Pass a null URL to wait (status 'idle').
 */
export function useMeshFile(url: string | null | undefined, options: MeshFileOptions = {}): MeshFileState {
  const { filename, unit, partName } = options;
  const [attempt, setAttempt] = useState(0);
  const [state, setState] = useState<{ key: string; outcome: Outcome } | null>(null);
  const retry = useCallback(() => {
    setState(null);
    setAttempt((n) => n + 1);
  }, []);
  const key = url ? cacheKey(url, { filename, unit, partName }) : null;

  useEffect(() => {
    if (!url || !key) return;
    let live = true;
    loadMeshFile(url, { filename, unit, partName }).then((outcome) => {
      if (live) setState({ key, outcome });
    });
    return () => {
      live = false;
    };
  }, [url, key, filename, unit, partName, attempt]);

  if (!url) return { status: 'idle', mesh: null, error: null, retry };
  if (!state || state.key !== key) return { status: 'loading', mesh: null, error: null, retry };
  if (state.outcome.ok) return { status: 'ready', mesh: state.outcome.mesh, error: null, retry };
  return { status: 'error', mesh: null, error: state.outcome.error, retry };
}
