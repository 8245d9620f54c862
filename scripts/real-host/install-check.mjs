// After `vsce package`: installs the newest countercheck-*.vsix into a throwaway code-server extensions folder
// (the same installer a desktop VS Code uses for `--install-extension`) and fails if it does not install.
import { existsSync, readFileSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { installVsix, repoRoot } from './host.mjs';

const vsix = readdirSync(repoRoot).filter((f) => /^countercheck-.*\.vsix$/.test(f)).map((f) => join(repoRoot, f)).sort((a, b) => statSync(b).mtimeMs - statSync(a).mtimeMs)[0];
if (!vsix) {
  console.error('no countercheck-*.vsix found; run `npm run package`');
  process.exit(1);
}
/** Files the installed extension must hold: its entry and lazy chunks, the icon, the l10n bundle and every walkthrough medium. */
function missingFiles(extensionsDir) {
  const folder = readdirSync(extensionsDir).find((n) => n.startsWith('countercheck.countercheck-'));
  if (!folder) return ['the extension folder'];
  const root = join(extensionsDir, folder);
  const manifest = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8'));
  const media = manifest.contributes.walkthroughs.flatMap((w) => w.steps.map((s) => s.media.markdown ?? s.media.image));
  const images = media.filter((m) => m.endsWith('.md')).flatMap((m) => [...readFileSync(join(root, m), 'utf8').matchAll(/!\[[^\]]*\]\(([^)]+)\)/g)].map((x) => join(m, '..', x[1])));
  const needed = [manifest.main, manifest.icon, 'dist/pg.js', 'dist/htmlparser2.js', 'dist/webview.js', 'dist/scanWorker.js', 'l10n/bundle.l10n.json', 'package.nls.json', 'THIRD-PARTY-NOTICES.md', 'media/walkthrough/bakery-defects.csv', ...media, ...images];
  return needed.filter((f) => !existsSync(join(root, f)));
}

const { installed, inspection: missing } = installVsix(vsix, missingFiles);
if (missing.length > 0) {
  console.error(`${vsix} installs without: ${missing.join(', ')}`);
  process.exit(1);
}
if (!installed.some((n) => n.startsWith('countercheck.countercheck-'))) {
  console.error(`${vsix} did not install (extensions folder holds: ${installed.join(', ') || 'nothing'})`);
  process.exit(1);
}
console.log(`${vsix} (${(statSync(vsix).size / 1024).toFixed(0)} KB) installs with code-server --install-extension: ${installed.join(', ')}`);
