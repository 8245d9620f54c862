// After `vsce package`: installs the newest countercheck-*.vsix into a throwaway code-server extensions folder
// (the same installer a desktop VS Code uses for `--install-extension`) and fails if it does not install.
import { readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { installVsix, repoRoot } from './host.mjs';

const vsix = readdirSync(repoRoot).filter((f) => /^countercheck-.*\.vsix$/.test(f)).map((f) => join(repoRoot, f)).sort((a, b) => statSync(b).mtimeMs - statSync(a).mtimeMs)[0];
if (!vsix) {
  console.error('no countercheck-*.vsix found; run `npm run package`');
  process.exit(1);
}
const { installed } = installVsix(vsix);
if (!installed.some((n) => n.startsWith('countercheck.countercheck-'))) {
  console.error(`${vsix} did not install (extensions folder holds: ${installed.join(', ') || 'nothing'})`);
  process.exit(1);
}
console.log(`${vsix} (${(statSync(vsix).size / 1024).toFixed(0)} KB) installs with code-server --install-extension: ${installed.join(', ')}`);
