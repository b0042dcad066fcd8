/**
 * A ZIP reader that inflates one entry at a time under caps, stopping the
 * moment an entry outgrows what it may become (APPNOTE.TXT, PKWARE's .ZIP
 * File Format Specification 6.3.x: end of central directory §4.3.16, its
 * ZIP64 form §4.3.14–15, central directory headers §4.3.12, local headers
 * §4.3.7, the ZIP64 extra field §4.5.3).
 *
 * The sizes a ZIP declares are only claims: an entry that says 4 kB may
 * inflate to a gigabyte. So inflating is streamed in small slices and
 * counted, and stops when the entry passes its declared size, the package's
 * remaining budget, or a ratio of inflated to compressed bytes no real
 * model reaches.
 */
import { Inflate } from 'fflate';

export interface ZipEntry {
  name: string;
  /** 0 stored, 8 deflated (the two methods a 3MF may use, 3MF Core §2 / OPC). */
  method: number;
  flags: number;
  compressedSize: number;
  /** What the central directory says the entry inflates to. */
  size: number;
  localOffset: number;
}

export interface InflateCaps {
  /** Inflated bytes this entry may still use (the package's budget left). */
  maxBytes: number;
  /** Inflated bytes per compressed byte an entry may reach... */
  maxRatio: number;
  /** ...once it is past this many inflated bytes (tiny entries compress well and harm no one). */
  ratioFloorBytes: number;
}

export type InflateFailure =
  | { ok: false; reason: 'budget'; bytes: number }
  | { ok: false; reason: 'declared'; bytes: number }
  | { ok: false; reason: 'ratio'; bytes: number }
  | { ok: false; reason: 'corrupt' }
  | { ok: false; reason: 'unsupported'; detail: string };

export type InflateResult = { ok: true; data: Uint8Array } | InflateFailure;

const SLICE = 4 * 1024;

const u16 = (b: Uint8Array, o: number) => b[o] | (b[o + 1] << 8);
const u32 = (b: Uint8Array, o: number) => (b[o] | (b[o + 1] << 8) | (b[o + 2] << 16)) + b[o + 3] * 0x1000000;
const u64 = (b: Uint8Array, o: number) => u32(b, o) + u32(b, o + 4) * 0x100000000;

function decodeName(bytes: Uint8Array, utf8: boolean): string {
  if (utf8) return new TextDecoder('utf-8').decode(bytes);
  let s = '';
  for (const c of bytes) s += String.fromCharCode(c);
  return s;
}

/** The entries of the central directory, or null when the bytes are not a readable ZIP. */
export function readZipDirectory(bytes: Uint8Array): ZipEntry[] | null {
  const n = bytes.length;
  if (n < 22) return null;
  // The end record sits in the last 22 + 65535 (comment) bytes.
  let eocd = -1;
  for (let i = n - 22; i >= Math.max(0, n - 22 - 0xffff); i--) {
    if (bytes[i] === 0x50 && bytes[i + 1] === 0x4b && bytes[i + 2] === 0x05 && bytes[i + 3] === 0x06) {
      eocd = i;
      break;
    }
  }
  if (eocd < 0) return null;
  let count = u16(bytes, eocd + 10);
  let cdOffset = u32(bytes, eocd + 16);
  if (count === 0xffff || cdOffset === 0xffffffff) {
    const loc = eocd - 20;
    if (loc < 0 || u32(bytes, loc) !== 0x07064b50) return null;
    const z64 = u64(bytes, loc + 8);
    if (z64 + 56 > n || u32(bytes, z64) !== 0x06064b50) return null;
    count = u64(bytes, z64 + 32);
    cdOffset = u64(bytes, z64 + 48);
  }
  const entries: ZipEntry[] = [];
  let p = cdOffset;
  for (let i = 0; i < count; i++) {
    if (p + 46 > n || u32(bytes, p) !== 0x02014b50) return null;
    const flags = u16(bytes, p + 8);
    const method = u16(bytes, p + 10);
    let compressedSize = u32(bytes, p + 20);
    let size = u32(bytes, p + 24);
    const nameLength = u16(bytes, p + 28);
    const extraLength = u16(bytes, p + 30);
    const commentLength = u16(bytes, p + 32);
    let localOffset = u32(bytes, p + 42);
    const nameStart = p + 46;
    if (nameStart + nameLength + extraLength > n) return null;
    const name = decodeName(bytes.subarray(nameStart, nameStart + nameLength), (flags & 0x800) !== 0);
    // ZIP64 extra field: the 64-bit values of the fields that read 0xFFFFFFFF, in this order.
    let e = nameStart + nameLength;
    const extraEnd = e + extraLength;
    while (e + 4 <= extraEnd) {
      const id = u16(bytes, e);
      const len = u16(bytes, e + 2);
      if (id === 0x0001) {
        let f = e + 4;
        if (size === 0xffffffff && f + 8 <= e + 4 + len) {
          size = u64(bytes, f);
          f += 8;
        }
        if (compressedSize === 0xffffffff && f + 8 <= e + 4 + len) {
          compressedSize = u64(bytes, f);
          f += 8;
        }
        if (localOffset === 0xffffffff && f + 8 <= e + 4 + len) localOffset = u64(bytes, f);
      }
      e += 4 + len;
    }
    entries.push({ name, method, flags, compressedSize, size, localOffset });
    p = extraEnd + commentLength;
  }
  return entries;
}

/** Inflates one entry, counting as it goes; stops at the first cap passed. */
export function inflateEntry(bytes: Uint8Array, entry: ZipEntry, caps: InflateCaps): InflateResult {
  if (entry.flags & 0x1) return { ok: false, reason: 'unsupported', detail: 'it is encrypted' };
  if (entry.method !== 0 && entry.method !== 8) return { ok: false, reason: 'unsupported', detail: `it uses compression method ${entry.method}` };
  const h = entry.localOffset;
  if (h + 30 > bytes.length || u32(bytes, h) !== 0x04034b50) return { ok: false, reason: 'corrupt' };
  const start = h + 30 + u16(bytes, h + 26) + u16(bytes, h + 28);
  const end = start + entry.compressedSize;
  if (end > bytes.length) return { ok: false, reason: 'corrupt' };
  const compressed = bytes.subarray(start, end);

  // The claims first: refused before a byte is inflated.
  if (entry.size > caps.maxBytes) return { ok: false, reason: 'budget', bytes: entry.size };
  const ratioExceeded = (inflated: number) =>
    inflated > caps.ratioFloorBytes && inflated > Math.max(1, entry.compressedSize) * caps.maxRatio;
  if (ratioExceeded(entry.size)) return { ok: false, reason: 'ratio', bytes: entry.size };

  if (entry.method === 0) {
    if (compressed.length !== entry.size) return { ok: false, reason: 'corrupt' };
    return { ok: true, data: compressed };
  }

  const chunks: Uint8Array[] = [];
  let total = 0;
  let stop: InflateFailure | null = null;
  let ended = false;
  const inflater = new Inflate((chunk, final) => {
    if (stop) return;
    total += chunk.length;
    if (total > entry.size) stop = { ok: false, reason: 'declared', bytes: total };
    else if (total > caps.maxBytes) stop = { ok: false, reason: 'budget', bytes: total };
    else if (ratioExceeded(total)) stop = { ok: false, reason: 'ratio', bytes: total };
    else chunks.push(chunk);
    if (final) ended = true;
  });
  try {
    for (let o = 0; o < compressed.length && !stop; o += SLICE) {
      const last = o + SLICE >= compressed.length;
      inflater.push(compressed.subarray(o, Math.min(o + SLICE, compressed.length)), last);
    }
    if (compressed.length === 0 && !stop) inflater.push(new Uint8Array(0), true);
  } catch {
    return { ok: false, reason: 'corrupt' };
  }
  if (stop) return stop;
  if (!ended || total !== entry.size) return { ok: false, reason: 'corrupt' };
  if (chunks.length === 1) return { ok: true, data: chunks[0] };
  const data = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    data.set(c, at);
    at += c.length;
  }
  return { ok: true, data };
}
