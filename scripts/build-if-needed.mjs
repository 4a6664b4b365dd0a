// Builds the client only when a source is newer than the last build, so `npm start` stays quick.
import { execSync } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import path from 'node:path';

const root = path.resolve(import.meta.dirname, '..');
const built = path.join(root, 'dist', 'index.html');

function newest(p) {
  const s = statSync(p);
  if (!s.isDirectory()) return s.mtimeMs;
  return readdirSync(p).reduce((max, name) => Math.max(max, newest(path.join(p, name))), s.mtimeMs);
}

const sources = ['src', 'shared', 'public', 'index.html', 'vite.config.ts', 'package-lock.json'].map((p) => path.join(root, p)).filter(existsSync);
const stale = !existsSync(built) || sources.some((p) => newest(p) > statSync(built).mtimeMs);
if (stale) {
  console.log('Building the client...');
  execSync('npx vite build --logLevel warn', { cwd: root, stdio: 'inherit' });
} else {
  console.log('The client is up to date.');
}
