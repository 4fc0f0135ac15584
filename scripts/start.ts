// `npm start`: exports the web app when the build is missing or older than its sources, then runs
// the server (which migrates and seeds the database on its own).
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';

const root = path.resolve(__dirname, '..');
const dist = path.join(root, 'dist', 'index.html');
const sources = ['app', 'components', 'lib', 'sim', 'assets', 'app.json', 'package.json', 'babel.config.js'];

function newestMtime(target: string): number {
  if (!fs.existsSync(target)) return 0;
  const stat = fs.statSync(target);
  if (!stat.isDirectory()) return stat.mtimeMs;
  let newest = stat.mtimeMs;
  for (const entry of fs.readdirSync(target)) newest = Math.max(newest, newestMtime(path.join(target, entry)));
  return newest;
}

export function webBuildIsStale(): boolean {
  if (!fs.existsSync(dist)) return true;
  const built = fs.statSync(dist).mtimeMs;
  return sources.some((s) => newestMtime(path.join(root, s)) > built);
}

export function buildWeb(): void {
  console.log('[ringwell] Building the web app (expo export)…');
  const result = spawnSync('npx', ['expo', 'export', '--platform', 'web', '--output-dir', 'dist'], {
    cwd: root,
    stdio: 'inherit',
    env: { ...process.env, CI: '1', EXPO_NO_TELEMETRY: '1' },
  });
  if (result.status !== 0) {
    console.error('[ringwell] The web build failed; see the output above.');
    process.exit(result.status ?? 1);
  }
}

if (require.main === module) {
  if (webBuildIsStale()) buildWeb();
  // eslint-disable-next-line @typescript-eslint/no-require-imports
  require('../server/index').startServer();
}
