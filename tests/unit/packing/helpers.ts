import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseBischoffRatcliff, parseInstance, type PackInstance } from '@/shared/packing';

/** Problems of the Bischoff & Ratcliff (Omega 23(4), 1995) container-loading sets BR1-BR3. */
export function brProblems(set: 1 | 2 | 3, timeLimitMs: number) {
  return parseBischoffRatcliff(readFileSync(join(__dirname, 'fixtures', `br${set}.txt`), 'utf8'), timeLimitMs);
}

export function instanceOf(input: unknown): PackInstance {
  const parsed = parseInstance(input);
  if (!parsed.ok) throw new Error(`test instance must parse: ${JSON.stringify(parsed.problems)}`);
  return parsed.instance;
}
