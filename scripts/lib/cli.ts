/** What the project's JSON command lines (pack, estimate) share: one-line failures (exit 2) and reading the input. */
import { readFileSync } from 'node:fs';
import { formatProblem } from '../../shared/packing';

/** Ends the command with exit code 2 and one line on standard error. */
export function fail(message: string): never {
  process.stderr.write(`${message.replace(/\s*\n\s*/g, ' ')}\n`);
  process.exit(2);
}

/** Reads and parses the JSON input (`-` for standard input); `what` names it in the failure line. */
export function readJsonInput(file: string, what: string): unknown {
  let text: string;
  try {
    text = readFileSync(file === '-' ? 0 : file, 'utf8');
  } catch (e) {
    fail(`${file}: cannot be read (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
  }
  try {
    return JSON.parse(text);
  } catch (e) {
    fail(`${what} is not valid JSON: ${(e as Error).message}`);
  }
}

/** Ends the command naming the first of the input's problems (exit 2), and how many more there are. */
export function failProblems(problems: { field: string; message: string }[]): never {
  const [first, ...rest] = problems;
  fail(formatProblem(first) + (rest.length > 0 ? ` (and ${rest.length} more problem${rest.length > 1 ? 's' : ''})` : ''));
}
