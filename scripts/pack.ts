/**
 * Packs one instance: `npm run --silent pack -- INSTANCE.json` (or `-` for
 * standard input). Prints the result as JSON and exits 0; bad input exits 2
 * with one line on standard error naming the field.
 */
import { readFileSync } from 'node:fs';
import { formatProblem, packSync, parseInstance } from '../shared/packing';

function fail(message: string): never {
  process.stderr.write(`${message.replace(/\s*\n\s*/g, ' ')}\n`);
  process.exit(2);
}

function main(): void {
  const args = process.argv.slice(2).filter((a) => a !== '--');
  if (args.length !== 1) fail('usage: pack INSTANCE.json (or - for standard input)');
  const file = args[0];
  let text: string;
  try {
    text = readFileSync(file === '-' ? 0 : file, 'utf8');
  } catch (e) {
    fail(`${file}: cannot be read (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (e) {
    fail(`instance is not valid JSON: ${(e as Error).message}`);
  }
  const parsed = parseInstance(json);
  if (!parsed.ok) {
    const [first, ...rest] = parsed.problems;
    fail(formatProblem(first) + (rest.length > 0 ? ` (and ${rest.length} more problem${rest.length > 1 ? 's' : ''})` : ''));
  }
  const result = packSync(parsed.instance);
  process.stdout.write(`${JSON.stringify(result)}\n`);
}

main();
