import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, renameSync, rmSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { ROOT } from './postgres';

const SOURCES = ['app', 'components', 'shared', 'workers', 'assets', 'app.json', 'babel.config.js', 'metro.config.js', 'package-lock.json'];

function newest(path: string): number {
  if (!existsSync(path)) return 0;
  const st = statSync(path);
  if (!st.isDirectory()) return st.mtimeMs;
  let max = st.mtimeMs;
  for (const e of readdirSync(path)) max = Math.max(max, newest(join(path, e)));
  return max;
}

/** Exports the web app with Metro when dist/ is missing or older than its sources. */
export function ensureWebBundle(log: (s: string) => void = console.log, opts: { force?: boolean } = {}): void {
  const index = join(ROOT, 'dist', 'index.html');
  const built = existsSync(index) ? statSync(index).mtimeMs : 0;
  const sources = Math.max(...SOURCES.map((s) => newest(join(ROOT, s))));
  if (!opts.force && built > sources) return;
  log(built ? 'The web app changed: exporting it again (expo export)...' : 'Exporting the web app (expo export, about a minute)...');
  // Export beside dist/ and swap it in whole, so a server reading dist/ (or
  // another run exporting at the same time) never sees half a bundle.
  const tmp = `dist.tmp-${process.pid}`;
  rmSync(join(ROOT, tmp), { recursive: true, force: true });
  const r = spawnSync('npx', ['expo', 'export', '--platform', 'web', '--output-dir', tmp], {
    cwd: ROOT,
    stdio: ['ignore', 'pipe', 'pipe'],
    encoding: 'utf8',
    env: { ...process.env, CI: '1', EXPO_NO_TELEMETRY: '1' },
  });
  if (r.status !== 0) {
    rmSync(join(ROOT, tmp), { recursive: true, force: true });
    throw new Error(`the web export failed:\n${(r.stderr || r.stdout).trim().split('\n').slice(-20).join('\n')}`);
  }
  const old = `dist.old-${process.pid}`;
  if (existsSync(join(ROOT, 'dist'))) renameSync(join(ROOT, 'dist'), join(ROOT, old));
  renameSync(join(ROOT, tmp), join(ROOT, 'dist'));
  rmSync(join(ROOT, old), { recursive: true, force: true });
}
