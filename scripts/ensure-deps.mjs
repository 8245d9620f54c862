// Installs the npm packages from package-lock.json when they are missing or older than the lock file,
// so `npm test` and `npm run demo` work on a fresh clone with nothing installed by hand.
import { execFileSync } from 'node:child_process';
import { existsSync, statSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const installed = join(root, 'node_modules', '.package-lock.json');
const lock = join(root, 'package-lock.json');
if (!existsSync(installed) || statSync(installed).mtimeMs < statSync(lock).mtimeMs) {
  console.log('installing npm packages (npm ci)…');
  try {
    execFileSync('npm', ['ci', '--no-audit', '--no-fund'], { cwd: root, stdio: 'inherit' });
  } catch {
    // npm has printed its own error above; one line on what to do, never a stack trace.
    console.error('countercheck setup: `npm ci` failed (see the npm error above); check the network and that Node 20 or later is on the PATH, then retry');
    process.exit(1);
  }
}
