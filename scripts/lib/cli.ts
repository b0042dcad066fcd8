/** What the project's JSON command lines (pack, estimate) share: one-line failures (exit 2) and reading the input. */
import { readFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { formatProblem } from '../../shared/packing';

/** Ends the command with exit code 2 and one line on standard error. */
export function fail(message: string): never {
  process.stderr.write(`${message.replace(/\s*\n\s*/g, ' ')}\n`);
  process.exit(2);
}

/**
 * The folder the command was called from, against which its file arguments (and the mesh paths of an instance read
 * from standard input) are read. `npm run` runs a package script in the package's root and names the caller's folder
 * in INIT_CWD; that holds only when this process is the script npm ran (`event`, its name in package.json), not when
 * a process started under another script (a test under `npm test`) runs the command itself.
 */
export function callerDir(event: string): string {
  const { npm_lifecycle_event: running, INIT_CWD: from } = process.env;
  return running === event && from ? from : process.cwd();
}

/** The folder an input's relative mesh paths are read from: the input file's own, or the caller's for standard input. */
export function inputDir(file: string, event: string): string {
  return file === '-' ? callerDir(event) : dirname(resolve(callerDir(event), file));
}

/** Reads and parses the JSON input (`-` for standard input; a relative path from the caller's folder, see callerDir); `what` names it in the failure line. */
export function readJsonInput(file: string, what: string, event: string): unknown {
  let text: string;
  try {
    text = readFileSync(file === '-' ? 0 : resolve(callerDir(event), file), 'utf8');
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
