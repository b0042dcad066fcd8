import { strFromU8 } from 'fflate';

/**
 * Decodes a text mesh format (ASCII STL, OBJ). Their keywords and numbers are
 * ASCII, so UTF-8 and Latin-1 read them alike; the platform's TextDecoder (a
 * web standard, also in Node and React Native's engine) is several times
 * faster on large files than building the string in JavaScript.
 */
export function decodeText(bytes: Uint8Array): string {
  if (typeof TextDecoder !== 'undefined') return new TextDecoder('utf-8').decode(bytes);
  return strFromU8(bytes, true);
}

const POW10 = Array.from({ length: 23 }, (_, k) => Number(`1e${k}`));

/**
 * Reads the number written in text[from, to). Plain decimals of up to 15
 * significant digits and a power of ten up to 22 are read directly: the digits
 * are an exact integer and one multiplication or division by an exact power of
 * ten rounds once, so the result is the correctly rounded value, the same as
 * Number() gives (Clinger, "How to read floating point numbers accurately",
 * PLDI 1990, the fast path). Anything else goes through Number(). Words for
 * non-finite values ("inf", "-inf", "nan") read as such.
 */
export function readNumberAt(text: string, from: number, to: number): number {
  let i = from;
  let c = text.charCodeAt(i);
  const negative = c === 45;
  if (c === 45 || c === 43) i++;
  let mantissa = 0;
  let digits = 0;
  let exponent = 0;
  let any = false;
  for (; i < to; i++) {
    c = text.charCodeAt(i);
    if (c < 48 || c > 57) break;
    mantissa = mantissa * 10 + (c - 48);
    if (mantissa !== 0) digits++;
    any = true;
  }
  if (i < to && c === 46) {
    for (i++; i < to; i++) {
      c = text.charCodeAt(i);
      if (c < 48 || c > 57) break;
      mantissa = mantissa * 10 + (c - 48);
      if (mantissa !== 0) digits++;
      exponent--;
      any = true;
    }
  }
  if (any && i < to && (c === 101 || c === 69)) {
    i++;
    let sign = 1;
    c = text.charCodeAt(i);
    if (c === 45 || c === 43) {
      sign = c === 45 ? -1 : 1;
      i++;
    }
    let e = 0;
    const start = i;
    for (; i < to; i++) {
      c = text.charCodeAt(i);
      if (c < 48 || c > 57) break;
      e = e * 10 + (c - 48);
      if (e > 1000) break;
    }
    if (i === start) any = false;
    exponent += sign * e;
  }
  if (any && i === to && digits <= 15) {
    let value: number | null = null;
    if (mantissa === 0 || exponent === 0) value = mantissa;
    else if (exponent < 0 && exponent >= -22) value = mantissa / POW10[-exponent];
    else if (exponent > 0 && exponent <= 22) value = mantissa * POW10[exponent];
    if (value !== null) return negative ? -value : value;
  }
  return readNumber(text.slice(from, to));
}

/** Like Number(), but reads the words C libraries print for non-finite values ("inf", "-inf", "nan") as such. */
export function readNumber(text: string): number {
  const value = Number(text);
  if (!Number.isNaN(value) || text === '') return text === '' ? NaN : value;
  const word = text.toLowerCase();
  if (word === 'inf' || word === '+inf' || word === 'infinity' || word === '+infinity') return Infinity;
  if (word === '-inf' || word === '-infinity') return -Infinity;
  return NaN;
}
