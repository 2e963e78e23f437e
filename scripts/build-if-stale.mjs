// `npm run prepare`: builds dist/ with the TypeScript compiler unless it is newer than every file it is
// built from. npm runs `prepare` after `npm ci`, and again when `npx landform` first links this folder into
// its own cache (the package's own command is not linked into node_modules/.bin, so npx installs the folder
// itself); that second build found nothing to do but still took seconds. `npm run build` always compiles.
import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, statSync, utimesSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('..', import.meta.url));
const stamp = join(root, 'dist', '.tsbuildinfo');

/** The newest modification time of the TypeScript files under a folder (0 when there are none). */
function newest(dir) {
  let latest = 0;
  if (!existsSync(dir)) return latest;
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) latest = Math.max(latest, newest(path));
    else if (entry.name.endsWith('.ts')) latest = Math.max(latest, statSync(path).mtimeMs);
  }
  return latest;
}

const inputs = Math.max(
  newest(join(root, 'src')),
  newest(join(root, 'bench')),
  statSync(join(root, 'tsconfig.json')).mtimeMs,
  statSync(join(root, 'package.json')).mtimeMs,
);
if (existsSync(stamp) && statSync(stamp).mtimeMs > inputs) process.exit(0);
const tsc = createRequire(import.meta.url).resolve('typescript/bin/tsc');
const run = spawnSync(
  process.execPath,
  [tsc, '-p', join(root, 'tsconfig.json'), '--incremental', '--tsBuildInfoFile', stamp],
  { stdio: 'inherit' },
);
if (run.status !== 0) process.exit(run.status ?? 1);
// A build that changed nothing leaves the stamp as it was: mark dist/ as checked now.
const now = new Date();
utimesSync(stamp, now, now);
