/**
 * Builds the client when the build is missing or stale. Staleness is decided by a hash of
 * the client's inputs (not file times, which a fresh clone resets), stored beside the build.
 */
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';

const INPUTS = ['app', 'shared', 'vite.config.ts', 'package-lock.json', 'tsconfig.app.json'];
const STAMP = '.build-stamp';

function hashInputs(root: string): string {
  const hash = createHash('sha256');
  const visit = (rel: string) => {
    const abs = path.join(root, rel);
    if (!fs.existsSync(abs)) return;
    const stat = fs.statSync(abs);
    if (stat.isDirectory()) {
      for (const name of fs.readdirSync(abs).sort()) {
        if (name === 'node_modules' || name.startsWith('.')) continue;
        visit(path.join(rel, name));
      }
    } else {
      hash.update(rel).update('\0').update(fs.readFileSync(abs)).update('\0');
    }
  };
  INPUTS.forEach(visit);
  return hash.digest('hex');
}

export function clientBuildIsCurrent(root: string, outDir: string): boolean {
  const stampFile = path.join(outDir, STAMP);
  return (
    fs.existsSync(path.join(outDir, 'index.html')) &&
    fs.existsSync(stampFile) &&
    fs.readFileSync(stampFile, 'utf8') === hashInputs(root)
  );
}

export function ensureClientBuild(root: string, outDir: string, log: (line: string) => void = console.log): void {
  if (clientBuildIsCurrent(root, outDir)) return;
  log('Building the client (first run, or its sources changed)…');
  const started = Date.now();
  const result = spawnSync(process.execPath, [path.join(root, 'node_modules/vite/bin/vite.js'), 'build', '--logLevel', 'warn'], {
    cwd: root,
    stdio: 'inherit',
  });
  if (result.status !== 0) throw new Error('The client build failed (see the output above).');
  fs.writeFileSync(path.join(outDir, STAMP), hashInputs(root));
  log(`Client built in ${((Date.now() - started) / 1000).toFixed(1)} s.`);
}
