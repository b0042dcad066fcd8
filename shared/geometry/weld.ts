/**
 * Merges vertices that sit at exactly the same position, so that a triangle
 * soup (STL stores every corner of every facet) gets shared vertices and its
 * topology (shells, open edges, orientation) can be measured.
 *
 * Keys are the float32 bit patterns of x, y, z in an open-addressing table;
 * -0 and +0 are the same position.
 */
export class VertexWelder {
  private bits: Uint32Array;
  private table: Int32Array;
  private mask: number;
  count = 0;

  constructor(expectedVertices: number) {
    const capacity = Math.max(16, expectedVertices);
    this.bits = new Uint32Array(capacity * 3);
    const tableSize = nextPow2(capacity * 2);
    this.table = new Int32Array(tableSize).fill(-1);
    this.mask = tableSize - 1;
  }

  /** Returns the index of the vertex with these float32 bit patterns, adding it when new. */
  add(bx: number, by: number, bz: number): number {
    if (bx === 0x80000000) bx = 0;
    if (by === 0x80000000) by = 0;
    if (bz === 0x80000000) bz = 0;
    const bits = this.bits;
    const table = this.table;
    const mask = this.mask;
    let slot = hash3(bx, by, bz) & mask;
    for (;;) {
      const v = table[slot];
      if (v < 0) break;
      const o = v * 3;
      if (bits[o] === bx && bits[o + 1] === by && bits[o + 2] === bz) return v;
      slot = (slot + 1) & mask;
    }
    const index = this.count;
    if ((index + 1) * 3 > bits.length) {
      this.growBits();
    }
    const o = index * 3;
    this.bits[o] = bx;
    this.bits[o + 1] = by;
    this.bits[o + 2] = bz;
    table[slot] = index;
    this.count = index + 1;
    if (this.count * 2 > this.table.length) this.rehash();
    return index;
  }

  /** The merged positions as float64 values (exactly the float32 values read). */
  positions(scale = 1): Float64Array {
    const f32 = new Float32Array(this.bits.buffer, 0, this.count * 3);
    const out = new Float64Array(this.count * 3);
    for (let i = 0; i < out.length; i++) out[i] = f32[i] * scale;
    return out;
  }

  private growBits(): void {
    const next = new Uint32Array(this.bits.length * 2);
    next.set(this.bits);
    this.bits = next;
  }

  private rehash(): void {
    const size = this.table.length * 2;
    const table = new Int32Array(size).fill(-1);
    const mask = size - 1;
    const bits = this.bits;
    for (let v = 0; v < this.count; v++) {
      const o = v * 3;
      let slot = hash3(bits[o], bits[o + 1], bits[o + 2]) & mask;
      while (table[slot] >= 0) slot = (slot + 1) & mask;
      table[slot] = v;
    }
    this.table = table;
    this.mask = mask;
  }
}

function hash3(a: number, b: number, c: number): number {
  let h = Math.imul(a ^ (a >>> 16), 0x85ebca6b);
  h = Math.imul(h ^ b ^ (b >>> 13), 0xc2b2ae35);
  h = Math.imul(h ^ c ^ (c >>> 16), 0x27d4eb2f);
  return (h ^ (h >>> 15)) >>> 0;
}

export function nextPow2(n: number): number {
  let p = 1;
  while (p < n) p *= 2;
  return p;
}

/**
 * Merges float64 vertices at exactly equal positions and rewrites the indices
 * (formats such as OBJ may repeat a position for each texture seam).
 */
export function weldExact(positions: Float64Array, indices: Uint32Array): { positions: Float64Array; indices: Uint32Array } {
  const count = positions.length / 3;
  const words = new Uint32Array(positions.buffer, positions.byteOffset, positions.length * 2);
  const tableSize = nextPow2(Math.max(16, count * 2));
  const mask = tableSize - 1;
  const table = new Int32Array(tableSize).fill(-1);
  const remap = new Uint32Array(count);
  const kept = new Float64Array(positions.length);
  let keptCount = 0;
  const zero = new Float64Array(1);
  for (let v = 0; v < count; v++) {
    const o = v * 3;
    // -0 and +0 are one position.
    for (let k = 0; k < 3; k++) if (positions[o + k] === 0) positions[o + k] = zero[0];
    const w = v * 6;
    let slot = hash3(words[w] ^ words[w + 1], words[w + 2] ^ words[w + 3], words[w + 4] ^ words[w + 5]) & mask;
    let found = -1;
    for (;;) {
      const u = table[slot];
      if (u < 0) break;
      const p = u * 3;
      if (kept[p] === positions[o] && kept[p + 1] === positions[o + 1] && kept[p + 2] === positions[o + 2]) {
        found = u;
        break;
      }
      slot = (slot + 1) & mask;
    }
    if (found < 0) {
      found = keptCount++;
      table[slot] = found;
      kept[found * 3] = positions[o];
      kept[found * 3 + 1] = positions[o + 1];
      kept[found * 3 + 2] = positions[o + 2];
    }
    remap[v] = found;
  }
  const out = new Uint32Array(indices.length);
  for (let i = 0; i < indices.length; i++) out[i] = remap[indices[i]];
  return { positions: kept.slice(0, keptCount * 3), indices: out };
}

/**
 * Leaves out the facets that add nothing to a solid's surface: a facet whose
 * corners, once welded, are not three distinct vertices (it has no area: two
 * corners round to one float32 position, as tiny facets of exported fillets
 * do), and a facet that repeats another with the same corners in the same
 * turn (the same patch of surface written twice). Each makes the edges it
 * touches read as shared by more than two facets, so a closed solid reads as
 * open; each also counts the same patch twice in a sum over facets. Removing
 * them is the usual first repair of a triangle soup (common practice); a facet
 * whose three distinct corners lie on one line is kept, because its edges are
 * shared with its neighbours. Returns the indices unchanged (the same array)
 * when nothing is left out.
 */
export function dropEmptyFacets(indices: Uint32Array): { indices: Uint32Array; collapsed: number; repeated: number } {
  const n = indices.length / 3;
  const tableSize = nextPow2(Math.max(16, n * 2));
  const mask = tableSize - 1;
  // Kept facets by their corners turned so the smallest comes first (the turn, and so the facing, kept); the table
  // holds facet numbers, and a facet's turned corners are worked out again from the indices when compared.
  const table = new Int32Array(tableSize).fill(-1);
  const keep = new Uint8Array(n);
  const turned = new Uint32Array(3);
  const turn = (f: number) => {
    const a = indices[3 * f], b = indices[3 * f + 1], c = indices[3 * f + 2];
    const first = b < a && b < c ? 1 : c < a && c < b ? 2 : 0;
    turned[0] = indices[3 * f + first];
    turned[1] = indices[3 * f + ((first + 1) % 3)];
    turned[2] = indices[3 * f + ((first + 2) % 3)];
  };
  let collapsed = 0, repeated = 0;
  for (let f = 0; f < n; f++) {
    const a = indices[3 * f], b = indices[3 * f + 1], c = indices[3 * f + 2];
    if (a === b || b === c || a === c) {
      collapsed++;
      continue;
    }
    turn(f);
    const t0 = turned[0], t1 = turned[1], t2 = turned[2];
    let slot = hash3(t0, t1, t2) & mask;
    let seen = false;
    for (;;) {
      const g = table[slot];
      if (g < 0) break;
      turn(g);
      if (turned[0] === t0 && turned[1] === t1 && turned[2] === t2) {
        seen = true;
        break;
      }
      slot = (slot + 1) & mask;
    }
    if (seen) {
      repeated++;
      continue;
    }
    table[slot] = f;
    keep[f] = 1;
  }
  if (collapsed + repeated === 0) return { indices, collapsed, repeated };
  const out = new Uint32Array(3 * (n - collapsed - repeated));
  let o = 0;
  for (let f = 0; f < n; f++) {
    if (!keep[f]) continue;
    out[o++] = indices[3 * f];
    out[o++] = indices[3 * f + 1];
    out[o++] = indices[3 * f + 2];
  }
  return { indices: out, collapsed, repeated };
}
