// `npm run demo`: builds the extension, installs the browser-based VS Code host if needed (cached),
// starts it on 127.0.0.1 with the demo workspace and the extension loaded from this folder, and prints
// the URL. Ctrl+C stops it (only the process group started here).
import { execFileSync } from 'node:child_process';
import { join } from 'node:path';
import { checkHostInstalled, isHostSetupError, repoRoot, startHost, testPayloadUrl } from './host.mjs';

function ensureHost() {
  try {
    checkHostInstalled();
  } catch (e) {
    if (!isHostSetupError(e)) throw e;
    console.log('Installing the VS Code host (Chromium is not needed for the demo; code-server and Node 24 are; a few minutes, once)…');
    execFileSync('bash', [join(repoRoot, 'scripts', 'ci', 'host.setup.sh')], { stdio: 'inherit' });
  }
}

execFileSync(process.execPath, [join(repoRoot, 'scripts', 'build.mjs')], { stdio: 'inherit', cwd: repoRoot });
ensureHost();
const host = await startHost({ folder: join(repoRoot, 'demo'), settings: { 'workbench.colorTheme': 'Default Light Modern' } });
const url = testPayloadUrl(host);
console.log(`\nCountercheck demo is running. Open this URL in a browser on this machine:\n\n  ${url}\n\nPress Ctrl+C to stop.`);
let stopping = false;
const stop = async () => {
  if (stopping) return;
  stopping = true;
  await host.stop();
  host.cleanup();
  process.exit(0);
};
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
setInterval(() => {}, 1 << 30);
