// `pretest`: everything `npm test` needs that a fresh clone lacks — the npm packages, and the
// browser-based VS Code host with Chromium for the integration and UI tests (cached outside the clone).
import { execFileSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
execFileSync(process.execPath, [join(root, 'scripts', 'ensure-deps.mjs')], { stdio: 'inherit' });
// Idempotent: a second run only checks the cache (a few milliseconds).
execFileSync('bash', [join(root, 'scripts', 'ci', 'host.setup.sh')], { stdio: 'inherit' });
