import { QueryClient, QueryObserver } from '@tanstack/react-query';
import { bracket, writeAsciiStl, writeBinaryStl } from '../../../shared/geometry';
import { forgetMeshFiles, meshFileKeys, meshFileQuery, trimMeshFiles } from '../../../components/queries/meshFiles';
import { MeshFileLoadError, type ParseMesh } from '../../../components/viewer/meshFileLoader';
import { parseMeshForView } from '../../../workers/mesh.worker';

// The mesh worker's own parsing, run in-process instead of on its thread.
const parse: ParseMesh = async (bytes, filename, unit, options) => parseMeshForView(bytes, filename, unit, options);
// A 40 x 30 mm angle bracket, 20 mm wide.
const buffer = (u8: Uint8Array) => u8.buffer.slice(u8.byteOffset, u8.byteOffset + u8.byteLength) as ArrayBuffer;
const stl = () => buffer(writeBinaryStl(bracket({ legAMm: 40, legBMm: 30, thicknessMm: 4, widthMm: 20, gussetMm: 6 })));

let served: Map<string, () => Response>;
let downloads: string[];

beforeEach(() => {
  served = new Map();
  downloads = [];
  jest.spyOn(globalThis, 'fetch').mockImplementation(async (input) => {
    const url = String(input);
    downloads.push(url);
    const answer = served.get(url);
    if (!answer) throw new TypeError('network down');
    return answer();
  });
});
afterEach(() => jest.restoreAllMocks());

const stlFile = (name = 'bracket.stl') => () => new Response(stl(), { headers: { 'content-disposition': `attachment; filename="${name}"` } });

/** A view showing the file until the returned function is called (the screen is left). */
function show(qc: QueryClient, url: string, options = {}) {
  const observer = new QueryObserver(qc, meshFileQuery(url, options, parse));
  const stop = observer.subscribe(() => undefined);
  return { observer, stop };
}

async function settled(qc: QueryClient) {
  while (qc.isFetching() > 0) await new Promise((r) => setTimeout(r, 1));
}

describe('the mesh cache of the 3D views', () => {
  const qc = new QueryClient();
  afterEach(() => qc.clear());

  it('two views of one file share one download and one parse', async () => {
    served.set('/api/labs/1/parts/7/file', stlFile());
    const [a, b] = await Promise.all([qc.fetchQuery(meshFileQuery('/api/labs/1/parts/7/file', {}, parse)), qc.fetchQuery(meshFileQuery('/api/labs/1/parts/7/file', {}, parse))]);
    expect(downloads).toEqual(['/api/labs/1/parts/7/file']);
    expect(a).toBe(b);
    expect(a.sizeMm[0]).toBeCloseTo(40, 4);
  });

  it('a screen opened again draws from the cache without downloading the file again', async () => {
    served.set('/f/1', stlFile());
    const first = show(qc, '/f/1');
    await settled(qc);
    const mesh = first.observer.getCurrentResult().data;
    expect(mesh).toBeDefined();
    first.stop(); // the editor is left

    const again = show(qc, '/f/1');
    expect(again.observer.getCurrentResult().data).toBe(mesh);
    await settled(qc);
    expect(downloads).toEqual(['/f/1']);
    again.stop();
  });

  it('the unit asked for is part of the cached mesh (an inch STL is 25.4 times larger)', async () => {
    served.set('/f/2', stlFile('bracket.stl'));
    const mm = await qc.fetchQuery(meshFileQuery('/f/2', { unit: 'mm' }, parse));
    const inch = await qc.fetchQuery(meshFileQuery('/f/2', { unit: 'inch' }, parse));
    expect(downloads).toHaveLength(2);
    expect(inch.sizeMm[0]).toBeCloseTo(mm.sizeMm[0] * 25.4, 2);
  });

  it("a refused download says the server's reason, and the next try downloads again", async () => {
    served.set('/f/3', () => new Response(JSON.stringify({ error: { code: 'not_found', message: 'The part has no stored file.' } }), { status: 404 }));
    await expect(qc.fetchQuery(meshFileQuery('/f/3', {}, parse))).rejects.toThrow('The part has no stored file.');
    served.set('/f/3', stlFile());
    const mesh = await qc.fetchQuery(meshFileQuery('/f/3', {}, parse));
    expect(mesh.triangles).toBeGreaterThan(0);
    expect(downloads).toEqual(['/f/3', '/f/3']);
  });

  it('a lost connection is told as such', async () => {
    await expect(qc.fetchQuery(meshFileQuery('/f/missing', {}, parse))).rejects.toThrow('check the connection');
  });

  it("a file the parser refuses gives the parser's problems", async () => {
    served.set('/f/4', () => new Response(new TextEncoder().encode('solid broken\n  facet normal 0 0 1\nendsolid'), { headers: { 'content-disposition': 'attachment; filename="broken.stl"' } }));
    const failure = await qc.fetchQuery(meshFileQuery('/f/4', {}, parse)).catch((e: unknown) => e);
    expect(failure).toBeInstanceOf(MeshFileLoadError);
    expect((failure as MeshFileLoadError).problems.length).toBeGreaterThan(0);
  });

  it('the file name comes from the download when the caller does not give it', async () => {
    // An ASCII STL under a name with a UTF-8 encoded character.
    served.set('/f/5', () => new Response(buffer(writeAsciiStl(bracket({ legAMm: 10, legBMm: 10, thicknessMm: 2, widthMm: 5, gussetMm: 2 }))), { headers: { 'content-disposition': "attachment; filename*=UTF-8''Halter%C3%BC.stl" } }));
    const seen: string[] = [];
    await qc.fetchQuery(meshFileQuery('/f/5', {}, async (b, name, unit, o) => (seen.push(name), parse(b, name, unit, o))));
    expect(seen).toEqual(['Halterü.stl']);
  });

  it('forgetting a file drops every unit and part of it and keeps the other files', async () => {
    served.set('/f/6', stlFile());
    served.set('/f/7', stlFile());
    await qc.fetchQuery(meshFileQuery('/f/6', { unit: 'mm' }, parse));
    await qc.fetchQuery(meshFileQuery('/f/6', { unit: 'cm' }, parse));
    await qc.fetchQuery(meshFileQuery('/f/7', {}, parse));
    forgetMeshFiles(qc, '/f/6');
    expect(qc.getQueryCache().findAll({ queryKey: meshFileKeys.all() }).map((q) => q.queryKey[1])).toEqual(['/f/7']);
  });

  it('meshes no view shows are dropped oldest first beyond the limit; shown ones stay', async () => {
    const now = jest.spyOn(Date, 'now');
    let t = 1_000;
    now.mockImplementation(() => (t += 1000));
    for (const n of [1, 2, 3, 4]) served.set(`/g/${n}`, stlFile());
    const shown = show(qc, '/g/1');
    await settled(qc);
    for (const n of [2, 3, 4]) await qc.fetchQuery(meshFileQuery(`/g/${n}`, {}, parse));
    trimMeshFiles(qc, 2);
    const kept = qc.getQueryCache().findAll({ queryKey: meshFileKeys.all() }).map((q) => q.queryKey[1]).sort();
    expect(kept).toEqual(['/g/1', '/g/3', '/g/4']);
    shown.stop();
  });
});
