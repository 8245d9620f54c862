// Bundles the integration suite (test/integration/*.ts) to out/integration-host/*.js for the extension host.
// `vscode` comes from the host; `mocha` is loaded from node_modules at run time.
import { build } from 'esbuild';
import { readdirSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { alias } from '../bundle-options.mjs';
import { repoRoot } from './host.mjs';

export async function buildIntegrationTests() {
  const dir = join(repoRoot, 'test', 'integration');
  const entries = readdirSync(dir).filter((f) => f.endsWith('.ts')).map((f) => join(dir, f));
  const outdir = join(repoRoot, 'out', 'integration-host');
  rmSync(outdir, { recursive: true, force: true });
  await build({
    entryPoints: entries,
    outdir,
    alias,
    bundle: true,
    platform: 'node',
    format: 'cjs',
    target: 'node20',
    sourcemap: 'inline',
    external: ['vscode', 'mocha'],
    logLevel: 'warning',
  });
  return join(outdir, 'index.js');
}
