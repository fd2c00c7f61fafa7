/** Global setup for browser tests: the built client, rebuilt only when its sources changed. */
import { ensureClientBuild } from '../../api/client-build';
import { repoRoot } from '../../api/config';
import { defaultClientDir } from '../../api/server';

export function setup() {
  ensureClientBuild(repoRoot, defaultClientDir(repoRoot), () => {});
}
