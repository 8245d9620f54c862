// Writes THIRD-PARTY-NOTICES.md: every package esbuild inlines into the shipped bundles (read from esbuild's
// metafile, so the list cannot drift from the build) and the bundled icon font, each with its licence text.
// `node scripts/notices.mjs --check` exits 1 when the file is stale (run by `npm run test:pack`).
import { build } from 'esbuild';
import { alias } from './bundle-options.mjs';
import { existsSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const shipped = [
  { entryPoints: ['src/host/extension.ts'], external: ['vscode'], platform: 'node' },
  { entryPoints: ['src/cli.ts'], platform: 'node' },
  { entryPoints: ['scripts/chunks/pg.cjs'], external: ['pg-native'], platform: 'node' },
  { entryPoints: ['scripts/chunks/htmlparser2.mjs'], platform: 'node' },
  { entryPoints: ['src/data/scanWorker.ts'], platform: 'node' },
  { entryPoints: ['src/webview/main.ts'], platform: 'browser' },
];

const packages = new Map();
for (const entry of shipped) {
  const { metafile } = await build({ ...entry, alias, absWorkingDir: root, bundle: true, write: false, metafile: true, logLevel: 'silent', outdir: 'out-notices', format: 'cjs' });
  for (const input of Object.keys(metafile.inputs)) {
    const m = /^(.*node_modules\/((?:@[^/]+\/)?[^/]+))\//.exec(input);
    if (m) packages.set(m[2], join(root, m[1]));
  }
}
packages.set('@vscode/codicons', join(root, 'node_modules/@vscode/codicons')); // dist/codicon.ttf and .css, copied by the build

function licenceText(dir) {
  const file = readdirSync(dir).find((f) => /^(licen[cs]e|copying)(\.md|\.txt)?$/i.test(f));
  if (file) return readFileSync(join(dir, file), 'utf8').trim();
  // A few packages carry their licence only as a README section.
  const readme = readdirSync(dir).find((f) => /^readme(\.md)?$/i.test(f));
  const section = readme && /(?:^|\n)#+ *licen[cs]e\s*\n([\s\S]*?)(?=\n#+ |(?![\s\S]))/i.exec(readFileSync(join(dir, readme), 'utf8'));
  return section ? section[1].trim() : undefined;
}

const sections = [...packages].sort(([a], [b]) => a.localeCompare(b)).map(([name, dir]) => {
  const meta = JSON.parse(readFileSync(join(dir, 'package.json'), 'utf8'));
  const licence = typeof meta.license === 'string' ? meta.license : meta.license?.type ?? 'see below';
  const text = licenceText(dir) ?? `(no licence file in the package; package.json declares ${licence})`;
  const note = name === '@vscode/codicons' ? '\nThe icon font (dist/codicon.ttf) is licensed under Creative Commons Attribution 4.0 International (CC-BY-4.0), https://creativecommons.org/licenses/by/4.0/ ; the icons are © Microsoft Corporation, unchanged.\n' : '';
  return `## ${name} ${meta.version} (${licence})\n${note}\n${meta.homepage ? `${meta.homepage}\n\n` : ''}\`\`\`text\n${text}\n\`\`\`\n`;
});
const out = `# Third-party notices\n\nCountercheck's bundles (the extension, the command line and the results panel) include the following\npackages. Each is listed with its version and licence text.\n\n${sections.join('\n')}`;
const target = join(root, 'THIRD-PARTY-NOTICES.md');
if (process.argv.includes('--check')) {
  if (!existsSync(target) || readFileSync(target, 'utf8') !== out) {
    console.error('THIRD-PARTY-NOTICES.md is stale: run `node scripts/notices.mjs`');
    process.exit(1);
  }
  console.log(`THIRD-PARTY-NOTICES.md lists the ${packages.size} bundled packages`);
} else {
  writeFileSync(target, out);
  console.log(`THIRD-PARTY-NOTICES.md: ${packages.size} packages`);
}
