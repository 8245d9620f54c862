// `pretest`: everything `npm test` needs that a fresh clone lacks — the npm packages, and the browser-based
// VS Code host with Chromium for the integration and UI tests (cached outside the clone). A failure is one line
// saying what failed and what to do (the child has printed its own reason above), never a stack trace.
import { spawnSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
for (const [what, command, args] of [
  ['installing the npm packages', process.execPath, [join(root, 'scripts', 'ensure-deps.mjs')]],
  // Idempotent: a second run only checks the cache (a few milliseconds).
  ['setting up the VS Code host for the integration tests', 'bash', [join(root, 'scripts', 'ci', 'host.setup.sh')]],
]) {
  const r = spawnSync(command, args, { stdio: 'inherit', cwd: root });
  if (r.status !== 0) {
    console.error(`\nnpm test: ${what} failed (exit ${r.status ?? r.signal}); see the message above, fix it, then run \`npm test\` again.`);
    process.exit(1);
  }
}
